/**
 * SBML Level 3 import (Hucka et al. 2019, J Integr Bioinform 16:20190021 for the
 * element meanings): mapping onto Linger's fixed rate kinds, and refusal reports
 * naming element, id and line. Models from the DSMTS (Evans, Gillespie &
 * Wilkinson 2008, Bioinformatics 24:285), tests/fixtures/dsmts/LICENSE.txt.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { importSbml, type SbmlImport } from "@/sim/sbml";

const fixture = (id: string) =>
  readFileSync(path.join(__dirname, "../../fixtures/dsmts", id, `${id}-sbml-l3v2.xml`), "utf8");

function ok(r: SbmlImport) {
  if (!r.ok) assert.fail(JSON.stringify(r.problems));
  return r;
}
function refused(r: SbmlImport) {
  if (r.ok) assert.fail("expected a refusal");
  return r.problems;
}

/** A minimal Level 3 Version 2 document around the given model body. */
const doc = (body: string, head = "") =>
  `<?xml version="1.0" encoding="UTF-8"?>
<sbml xmlns="http://www.sbml.org/sbml/level3/version2/core" level="3" version="2"${head}>
  <model id="m" name="Test">
${body}
  </model>
</sbml>`;
const ma = (...xs: string[]) =>
  `<math xmlns="http://www.w3.org/1998/Math/MathML"><apply><times/>${xs.map((x) => (/^[0-9.]+$/.test(x) ? `<cn>${x}</cn>` : `<ci>${x}</ci>`)).join("")}</apply></math>`;
const compartments = `<listOfCompartments><compartment id="C" size="2" constant="true"/></listOfCompartments>`;
const speciesX = (extra = 'hasOnlySubstanceUnits="true"') =>
  `<listOfSpecies><species id="X" compartment="C" initialAmount="10" ${extra} boundaryCondition="false" constant="false"/></listOfSpecies>`;
const reaction = (id: string, reactants: string, products: string, math: string, local = "") =>
  `<reaction id="${id}" reversible="false">
  ${reactants ? `<listOfReactants>${reactants}</listOfReactants>` : ""}
  ${products ? `<listOfProducts>${products}</listOfProducts>` : ""}
  <kineticLaw>${math}${local}</kineticLaw></reaction>`;
const ref = (s: string, n = 1) => `<speciesReference species="${s}" stoichiometry="${n}" constant="true"/>`;

test("DSMTS birth-death 001-01 becomes two mass-action reactions with the SBML ids as names", () => {
  const r = ok(importSbml(fixture("00001")));
  assert.deepEqual(r.circuit.species, [{ name: "X", initialCount: 100 }]);
  assert.deepEqual(
    r.circuit.reactions.map((x) => [x.name, x.reactants, x.products, x.rate]),
    [
      ["Birth", [{ species: "X", count: 1 }], [{ species: "X", count: 2 }], { kind: "massAction", ratePerMinute: 0.1 }],
      ["Death", [{ species: "X", count: 1 }], [], { kind: "massAction", ratePerMinute: 0.11 }],
    ],
  );
  assert.equal(r.circuit.outputSpecies, "X");
  assert.match(r.notes.join(), /"second" is read as minutes/);
});

test("local parameters, boundary species and immigration (constant rate) from the DSMTS cases", () => {
  const local = ok(importSbml(fixture("00002")));
  assert.deepEqual(
    local.circuit.reactions.map((x) => x.rate),
    [
      { kind: "massAction", ratePerMinute: 0.1 },
      { kind: "massAction", ratePerMinute: 0.11 },
    ],
  );
  const boundary = ok(importSbml(fixture("00024")));
  assert.deepEqual(
    boundary.circuit.reactions.map((x) => [x.reactants, x.products, x.rate]),
    [
      [[], [{ species: "X", count: 1 }], { kind: "constant", ratePerMinute: 10 }],
      [[{ species: "X", count: 1 }], [], { kind: "massAction", ratePerMinute: 0.1 }],
    ],
  );
  assert.deepEqual(
    boundary.circuit.species.map((s) => s.name),
    ["X", "Source", "Sink"],
  );
});

test("a concentration species (hasOnlySubstanceUnits=false) divides by its compartment size inside the law", () => {
  // Propensity k * X/C with C = 2: Linger's constant on the amount is k/2.
  const r = ok(
    importSbml(
      doc(`${compartments}${speciesX('hasOnlySubstanceUnits="false"')}
    <listOfParameters><parameter id="k" value="0.3" constant="true"/></listOfParameters>
    <listOfReactions>${reaction("D", ref("X"), "", ma("k", "X"))}</listOfReactions>`),
    ),
  );
  assert.equal(r.circuit.reactions[0].rate.kind, "massAction");
  assert.ok(Math.abs((r.circuit.reactions[0].rate as { ratePerMinute: number }).ratePerMinute - 0.15) < 1e-15);
});

test("dimerisation is mass action only in the exact stochastic form k*X*(X-1)/2; k*X*X becomes an expression", () => {
  const exact = `<math xmlns="http://www.w3.org/1998/Math/MathML"><apply><divide/><apply><times/><ci>k</ci><ci>X</ci><apply><minus/><ci>X</ci><cn type="integer">1</cn></apply></apply><cn>2</cn></apply></math>`;
  const body = (m: string) =>
    doc(`${compartments}${speciesX()}
    <listOfParameters><parameter id="k" value="0.4" constant="true"/></listOfParameters>
    <listOfReactions>${reaction("Dim", ref("X", 2), "", m)}</listOfReactions>`);
  const r = ok(importSbml(body(exact)));
  assert.deepEqual(r.circuit.reactions[0].rate, { kind: "massAction", ratePerMinute: 0.4 });
  // k*X*X is not Linger's mass action for 2X: it is kept as the expression it is (the propensity as written)
  const other = ok(importSbml(body(ma("k", "X", "X"))));
  assert.deepEqual(other.circuit.reactions[0].rate, { kind: "expression", formula: "((k * X) * X)" });
  assert.deepEqual(other.circuit.parameters, [{ name: "k", value: 0.4 }]);
});

test("initial assignments of constants are evaluated; a parameter doubled sets the rate", () => {
  const r = ok(
    importSbml(
      doc(`${compartments}${speciesX()}
    <listOfParameters><parameter id="k" value="0.3" constant="true"/><parameter id="k2" constant="true"/></listOfParameters>
    <listOfInitialAssignments><initialAssignment symbol="k2">${ma("2", "k")}</initialAssignment></listOfInitialAssignments>
    <listOfReactions>${reaction("D", ref("X"), "", ma("k2", "X"))}</listOfReactions>`),
    ),
  );
  assert.deepEqual(r.circuit.reactions[0].rate, { kind: "massAction", ratePerMinute: 0.6 });
});

test("rules, unreadable events and laws, and bad ids are all listed, each with id and line; nothing is imported", () => {
  const src = doc(`${compartments}
    <listOfSpecies>
      <species id="X" compartment="C" initialAmount="10" hasOnlySubstanceUnits="true" boundaryCondition="false" constant="false"/>
      <species id="_y" compartment="C" initialAmount="1" hasOnlySubstanceUnits="true" boundaryCondition="false" constant="false"/>
    </listOfSpecies>
    <listOfParameters><parameter id="k" value="1" constant="true"/></listOfParameters>
    <listOfRules><assignmentRule variable="k"><math xmlns="http://www.w3.org/1998/Math/MathML"><cn>1</cn></math></assignmentRule></listOfRules>
    <listOfReactions>
      ${reaction("Hill", "", ref("X"), `<math xmlns="http://www.w3.org/1998/Math/MathML"><apply><divide/><ci>k</ci><apply><sin/><ci>X</ci></apply></apply></math>`)}
    </listOfReactions>
    <listOfEvents><event id="ev"><trigger initialValue="true" persistent="true"><math xmlns="http://www.w3.org/1998/Math/MathML"><true/></math></trigger></event></listOfEvents>`);
  const problems = refused(importSbml(src));
  const brief = problems.map((p) => `${p.element}|${p.id}|${p.line}`);
  assert.deepEqual(brief.sort(), ["assignmentRule|k|10", "event|ev|17", "kineticLaw|Hill|15", "species|_y|7"].sort());
  assert.match(problems.find((p) => p.id === "Hill")!.reason, /MathML <sin\/> is not supported/);
  assert.match(problems.find((p) => p.id === "ev")!.reason, /MathML <true> is not supported/);
  assert.match(problems.find((p) => p.id === "_y")!.reason, /cannot be a Linger species name/);
});

test("time in a kinetic law, packages, other levels and malformed XML are refused with a line", () => {
  const timed = doc(`${compartments}${speciesX()}
    <listOfReactions>${reaction("T", "", ref("X"), `<math xmlns="http://www.w3.org/1998/Math/MathML"><csymbol encoding="text" definitionURL="http://www.sbml.org/sbml/symbols/time">t</csymbol></math>`)}</listOfReactions>`);
  assert.match(refused(importSbml(timed))[0].reason, /time may appear only in a piecewise condition/);
  const pkg = refused(importSbml(doc(`${compartments}`, ' xmlns:comp="x" comp:required="true"')));
  assert.match(pkg[0].reason, /package "comp"/);
  const l2 = refused(importSbml(`<sbml level="2" version="3"><model/></sbml>`));
  assert.match(l2[0].reason, /Level 2 Version 3: Linger reads Level 3 Versions 1 and 2, and Level 2 Version 4/);
  const bad = refused(importSbml(`<?xml version="1.0"?>\n<sbml level="3" version="2">\n<model>\n</sbml>`));
  assert.equal(bad[0].line, 4);
  assert.match(bad[0].reason, /not well-formed/);
});

test("Level 2 Version 4 reads like Level 3 where they agree: the same circuit as the Level 3 Version 2 file", () => {
  const own = (name: string) => readFileSync(path.join(__dirname, "../../fixtures/sbml", name), "utf8");
  const l2 = ok(importSbml(own("tank-sensor-l2v4.xml")));
  const l3 = ok(importSbml(own("tank-sensor.xml")));
  assert.deepEqual([l2.level, l2.version], [2, 4]);
  assert.deepEqual(l2.circuit.species, l3.circuit.species);
  assert.deepEqual(l2.circuit.reactions, l3.circuit.reactions);
  assert.deepEqual(l2.circuit.parameters, l3.circuit.parameters);
  assert.ok(l2.notes.some((n) => /Level 2 Version 4: the model's time unit/.test(n)));
  // Level 2's default is reversible: a reaction that does not say reversible="false" is refused, with its line.
  const text = own("tank-sensor-l2v4.xml").replace(
    '<reaction id="lose_rptC" reversible="false">',
    '<reaction id="lose_rptC">',
  );
  const problems = refused(importSbml(text));
  assert.equal(problems.length, 1);
  assert.deepEqual([problems[0].element, problems[0].id], ["reaction", "lose_rptC"]);
  assert.equal(problems[0].line, text.split("\n").findIndex((l) => l.includes('<reaction id="lose_rptC">')) + 1);
  assert.match(problems[0].reason, /reversible by default/);
  // Level 2 species types are refused item by item.
  const typed = own("tank-sensor-l2v4.xml").replace(
    "<listOfCompartments>",
    '<listOfSpeciesTypes><speciesType id="protein"/></listOfSpeciesTypes>\n    <listOfCompartments>',
  );
  assert.match(refused(importSbml(typed))[0].reason, /species types \(Level 2\) are not supported/);
});

test('initialValue="false" with a trigger already true at t = 0 is refused (SBML Level 3 Version 2 Core, Hucka et al. 2019, J Integr Bioinform 16:20190021: such a trigger fires at t = 0; from memory); false at t = 0 imports', () => {
  const model = (initialValue: string, level: number) =>
    doc(`${compartments}
    ${speciesX()}
    <listOfReactions>${reaction("decay", ref("X"), "", ma("0.1", "X"))}</listOfReactions>
    <listOfEvents><event id="refill" useValuesFromTriggerTime="true"><trigger initialValue="${initialValue}" persistent="true"><math xmlns="http://www.w3.org/1998/Math/MathML"><apply><lt/><ci>X</ci><cn>${level}</cn></apply></math></trigger>
      <listOfEventAssignments><eventAssignment variable="X"><math xmlns="http://www.w3.org/1998/Math/MathML"><cn>10</cn></math></eventAssignment></listOfEventAssignments></event></listOfEvents>`);
  // X starts at 10: "X < 20" is true at t = 0, "X < 5" is not
  const problems = refused(importSbml(model("false", 20)));
  assert.equal(problems.length, 1);
  assert.equal(problems[0].id, "refill");
  assert.match(problems[0].reason, /already true at t = 0 and initialValue="false"/);
  ok(importSbml(model("false", 5)));
  ok(importSbml(model("true", 20)));
});
