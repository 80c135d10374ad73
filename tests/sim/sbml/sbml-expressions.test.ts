/**
 * SBML for expression rates, named parameters and events: import of kinetic
 * laws that are not fixed kinds (MathML log without a base is base 10, as the
 * MathML 2.0 recommendation defines it), of events, and export of all three,
 * checked by libSBML (Debian's python3-sbml5 under /usr/bin/python3) and by an
 * export -> import -> simulate round trip with identical grid statistics.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import { exportSbml, importSbml, formatSbmlProblems, type SbmlImport } from "@/sim/sbml";
import { runSetup, simulateChunk } from "@/sim";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { CircuitSchema, type Circuit } from "@/shared/schemas/circuit";

const VALIDATE = `
import sys, json, libsbml
out = []
for text in json.load(sys.stdin):
    d = libsbml.readSBMLFromString(text)
    d.checkConsistency()
    errs = [d.getError(i) for i in range(d.getNumErrors())]
    out.append([e.getMessage().strip()[:300] for e in errs if e.getSeverity() >= libsbml.LIBSBML_SEV_ERROR])
print(json.dumps(out))
`;
const libsbmlErrors = (docs: string[]): string[][] =>
  JSON.parse(String(execFileSync("/usr/bin/python3", ["-c", VALIDATE], { input: JSON.stringify(docs) })));

function ok(r: SbmlImport) {
  if (!r.ok) assert.fail(formatSbmlProblems(r.problems));
  return r;
}

const M = (inner: string) => `<math xmlns="http://www.w3.org/1998/Math/MathML">${inner}</math>`;
const doc = (body: string) => `<?xml version="1.0" encoding="UTF-8"?>
<sbml xmlns="http://www.sbml.org/sbml/level3/version2/core" level="3" version="2">
  <model id="vat" timeUnits="minute">
    <listOfCompartments><compartment id="C" size="1" constant="true"/></listOfCompartments>
    <listOfSpecies>
      <species id="S" compartment="C" initialAmount="200" hasOnlySubstanceUnits="true" boundaryCondition="false" constant="false"/>
      <species id="P" compartment="C" initialAmount="0" hasOnlySubstanceUnits="true" boundaryCondition="false" constant="false"/>
    </listOfSpecies>
    <listOfParameters>
      <parameter id="Vmax" value="5" constant="false"/>
      <parameter id="Km" value="40" constant="true"/>
    </listOfParameters>
    ${body}
  </model>
</sbml>`;
const mm = M(
  `<apply><divide/><apply><times/><ci>Vmax</ci><ci>S</ci></apply><apply><plus/><ci>Km</ci><ci>S</ci></apply></apply>`,
);
const conversion = (law: string) => `<listOfReactions>
      <reaction id="convert" reversible="false">
        <listOfReactants><speciesReference species="S" stoichiometry="1" constant="true"/></listOfReactants>
        <listOfProducts><speciesReference species="P" stoichiometry="1" constant="true"/></listOfProducts>
        <kineticLaw>${law}</kineticLaw>
      </reaction>
    </listOfReactions>`;

test("a Michaelis-Menten law becomes an expression over the circuit's parameters", () => {
  const r = ok(importSbml(doc(conversion(mm))));
  assert.deepEqual(r.circuit.reactions[0].rate, { kind: "expression", formula: "((Vmax * S) / (Km + S))" });
  assert.deepEqual(r.circuit.parameters, [
    { name: "Vmax", value: 5 },
    { name: "Km", value: 40 },
  ]);
});

test("MathML log without a base is log10; with a base b it is ln(x)/ln(b); root without a degree is sqrt", () => {
  const law = M(
    `<apply><plus/><apply><log/><ci>S</ci></apply><apply><log/><logbase><cn>2</cn></logbase><ci>S</ci></apply><apply><root/><ci>S</ci></apply></apply>`,
  );
  const r = ok(importSbml(doc(conversion(law))));
  const rate = r.circuit.reactions[0].rate;
  assert.equal(rate.kind, "expression");
  assert.equal(rate.kind === "expression" ? rate.formula : "", "((log10(S) + (ln(S) / ln(2))) + sqrt(S))");
});

test("events: time and species triggers, assignments to species and parameters; delays and priorities are refused", () => {
  const events = `<listOfEvents>
      <event id="feed" useValuesFromTriggerTime="true">
        <trigger initialValue="false" persistent="true">${M(`<apply><geq/><csymbol encoding="text" definitionURL="http://www.sbml.org/sbml/symbols/time">t</csymbol><cn>30</cn></apply>`)}</trigger>
        <listOfEventAssignments><eventAssignment variable="S">${M(`<apply><plus/><ci>S</ci><cn>100</cn></apply>`)}</eventAssignment></listOfEventAssignments>
      </event>
      <event id="slow" useValuesFromTriggerTime="true">
        <trigger initialValue="false" persistent="true">${M(`<apply><gt/><ci>P</ci><cn>150</cn></apply>`)}</trigger>
        <listOfEventAssignments><eventAssignment variable="Vmax">${M(`<cn>1</cn>`)}</eventAssignment></listOfEventAssignments>
      </event>
    </listOfEvents>`;
  const r = ok(importSbml(doc(conversion(mm) + events)));
  assert.deepEqual(r.circuit.events, [
    { name: "feed", when: "(time >= 30)", assign: [{ target: "S", value: "(S + 100)" }] },
    { name: "slow", when: "(P > 150)", assign: [{ target: "Vmax", value: "1" }] },
  ]);
  const delayed = events.replace(
    '<trigger initialValue="false" persistent="true">',
    `<delay>${M("<cn>1</cn>")}</delay><trigger initialValue="false" persistent="true">`,
  );
  const refused = importSbml(doc(conversion(mm) + delayed));
  assert.equal(refused.ok, false);
  assert.match(
    refused.ok ? "" : formatSbmlProblems(refused.problems),
    /event "feed" \(line \d+\): event delays are not supported/,
  );
});

/** A circuit with every new feature, in the fermentation-vat scenario. */
const rich: Circuit = CircuitSchema.parse({
  name: "Vat sensor with a dosing schedule",
  species: [
    { name: "sugar", initialCount: 300 },
    { name: "rpt", initialCount: 0 },
  ],
  signals: [{ name: "ind", offLevel: 0, onLevel: 1 }],
  parameters: [
    { name: "vmax", value: 4 },
    { name: "Ks", value: 50 },
    { name: "kdeg", value: 0.05 },
  ],
  reactions: [
    {
      name: "sense",
      products: [{ species: "rpt" }],
      rate: {
        kind: "expression",
        formula:
          "vmax * sugar / (Ks + sugar) * piecewise(1, time >= 10 and time < 60, 0.2) + 0.01 * sqrt(sugar) + log10(1 + min(sugar, 100)) * pow(0.5, 2)",
      },
    },
    { name: "eat", reactants: [{ species: "sugar" }], rate: { kind: "massAction", ratePerMinute: 0.01 } },
    {
      name: "lose",
      reactants: [{ species: "rpt" }],
      rate: { kind: "massAction", ratePerMinute: 0.05, use: { ratePerMinute: "kdeg" } },
    },
  ],
  events: [
    { name: "dose", at: [20, 50], assign: [{ target: "sugar", value: "sugar + 200" }] },
    { name: "alarm", when: "rpt >= 120", assign: [{ target: "kdeg", value: "kdeg * 2" }] },
    { name: "reset", when: "time >= 70", assign: [{ target: "rpt", value: "floor(rpt / 2)" }] },
  ],
  outputSpecies: "rpt",
});

test("expressions, parameters and events export with no libSBML errors", () => {
  const dsmts28 = importSbml(
    readFileSync(path.join(__dirname, "../../fixtures/dsmts/00028/00028-sbml-l3v2.xml"), "utf8"),
  );
  const docs = [exportSbml(rich), exportSbml(ok(dsmts28).circuit)];
  assert.match(docs[0], /<listOfEvents>/);
  assert.match(docs[0], /<event id="dose__2"/);
  assert.deepEqual(libsbmlErrors(docs), [[], []]);
});

test("export -> import -> simulate: the same grid statistics for the same seed", () => {
  const back = ok(importSbml(exportSbml(rich))).circuit;
  assert.equal(back.events?.length, 4, "dose at two times becomes two events");
  const spec = (c: Circuit) =>
    RunSpecSchema.parse({
      circuit: c,
      endTimeMinutes: 90,
      gridStepMinutes: 1,
      replicates: 100,
      seed: "round-trip-events",
    });
  const a = simulateChunk(spec(rich), 0, 100, { trajectoryReplicates: 0 });
  const b = simulateChunk(spec(back), 0, 100, { trajectoryReplicates: 0 });
  assert.ok(a.events > 0);
  assert.equal(b.events, a.events);
  assert.deepEqual(Array.from(b.gridSum), Array.from(a.gridSum));
  assert.deepEqual(Array.from(b.gridSumSq), Array.from(a.gridSumSq));
});

test("the input program exports as events setting the signal; re-imported, the circuit alone gives the same statistics", () => {
  const circuit = CircuitSchema.parse({
    name: "Induced vat reporter",
    species: [{ name: "rpt", initialCount: 0 }],
    signals: [{ name: "ind", offLevel: 0, onLevel: 1 }],
    reactions: [
      { name: "make", products: [{ species: "rpt" }], rate: { kind: "constant", ratePerMinute: 8 }, scaledBy: "ind" },
      { name: "lose", reactants: [{ species: "rpt" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    ],
    outputSpecies: "rpt",
  });
  const spec = RunSpecSchema.parse({
    circuit,
    program: {
      kind: "pulses",
      pulses: [
        { start: 10, duration: 15 },
        { start: 40, duration: 5, level: 2 },
      ],
    },
    inputSignal: "ind",
    endTimeMinutes: 60,
    gridStepMinutes: 1,
    replicates: 100,
    seed: "program-export",
  });
  const program = runSetup(spec).sharedProgram!;
  const xml = exportSbml(circuit, { signal: "ind", switchTimes: program.switchTimes, levels: program.levels });
  assert.match(xml, /<event id="ind_switch_4"/);
  assert.deepEqual(libsbmlErrors([xml]), [[]]);
  const back = ok(importSbml(xml)).circuit;
  const plain = RunSpecSchema.parse({ ...spec, circuit: back, program: undefined, inputSignal: undefined });
  const a = simulateChunk(spec, 0, 100, { trajectoryReplicates: 0 });
  const b = simulateChunk(plain, 0, 100, { trajectoryReplicates: 0 });
  assert.ok(a.events > 0);
  assert.deepEqual(Array.from(b.gridSum), Array.from(a.gridSum));
  assert.deepEqual(Array.from(b.gridSumSq), Array.from(a.gridSumSq));
});
