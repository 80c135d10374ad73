/**
 * SBML Level 3 Version 2 Core export of a Linger circuit (Hucka et al. 2019,
 * J Integr Bioinform 16:20190021). One compartment `cell` of size 1; species in
 * amounts (hasOnlySubstanceUnits="true"); signals as parameters at their off
 * level; each reaction's constants as local parameters of its kinetic law, the
 * law in MathML as the propensity in molecules per minute:
 *   constant: k;  mass action: k, k*A, k*A*B, k*A*(A-1)/2;
 *   regulated: vmax*(leak + (1-leak)*f), Hill terms x^n/(K^n+x^n) or K^n/(K^n+x^n),
 *   AND = product, OR = 1 - product(1 - h); times the scaling signal if any.
 * Linger's own facts (output species, signal on levels) sit only under the
 * namespaced annotation LINGER_SBML_NS.
 *
 * An input program, when given (its compiled switch times and levels), is
 * exported as events: the driven signal's parameter becomes constant="false"
 * and an event `<signal>_switch_<k>` sets it to each switch's level at the
 * switch time (time >= t). These events fire before the circuit's own events
 * at the same time, as in Linger.
 *
 * Named parameters are global parameters (constant="false" when an event sets
 * them); a fixed-kind field that follows one reads the global parameter
 * instead of a local one. Expression rates, event triggers and assignments are
 * written from their checked trees (./mathml-tree.ts). Events become SBML
 * events without delay (an `at` event with several times, one event per time,
 * id NAME__k); triggers have initialValue="true", so a condition already true
 * at the start does not fire, as in Linger.
 */
import type { Circuit, Reaction, Regulator } from "@/shared/schemas/circuit";
import { namesRead, parseExpression, type ExprNode } from "@/sim/circuit/expression";
import { treeToMathml } from "./mathml-tree";

function scopeOf(circuit: Circuit, allowTime = true) {
  return {
    species: new Set(circuit.species.map((s) => s.name)),
    signals: new Set(circuit.signals.map((s) => s.name)),
    params: new Set((circuit.parameters ?? []).map((q) => q.name)),
    allowTime,
  };
}

function treeOf(text: string, circuit: Circuit, want: "num" | "bool" = "num", allowTime = true): ExprNode {
  const r = parseExpression(text, scopeOf(circuit, allowTime), want);
  if (!r.ok) throw new Error(`cannot export "${text}": ${r.error.message}`);
  return r.tree;
}

export const LINGER_SBML_NS = "https://linger.invalid/ns/sbml-annotation/1";

const esc = (s: string) => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");

const ci = (id: string) => `<ci>${id}</ci>`;
const cn = (v: number) => `<cn>${v}</cn>`;
const apply = (op: string, ...args: string[]) => `<apply><${op}/>${args.join("")}</apply>`;

function hill(reg: Regulator, kId: string, nId: string): string {
  const xn = apply("power", ci(reg.source), ci(nId));
  const kn = apply("power", ci(kId), ci(nId));
  return apply("divide", reg.effect === "activates" ? xn : kn, apply("plus", kn, xn));
}

function kineticLaw(r: Reaction, circuit: Circuit): { math: string; locals: [string, number][] } {
  const locals: [string, number][] = [];
  /** A local parameter, or the global parameter the field follows. */
  const local = (id: string, value: number, follows: string | undefined) => {
    if (follows !== undefined) return follows;
    locals.push([id, value]);
    return id;
  };
  let body: string;
  if (r.rate.kind === "constant") {
    body = ci(local("k", r.rate.ratePerMinute, r.rate.use?.ratePerMinute));
  } else if (r.rate.kind === "massAction") {
    const k = local("k", r.rate.ratePerMinute, r.rate.use?.ratePerMinute);
    const [a, b] = r.reactants;
    if (!a) body = ci(k);
    else if (b) body = apply("times", ci(k), ci(a.species), ci(b.species));
    else if (a.count === 1) body = apply("times", ci(k), ci(a.species));
    else body = apply("divide", apply("times", ci(k), ci(a.species), apply("minus", ci(a.species), cn(1))), cn(2));
  } else if (r.rate.kind === "expression") {
    body = treeToMathml(treeOf(r.rate.formula, circuit));
  } else {
    const rate = r.rate;
    const vmax = local("vmax", rate.maxRatePerMinute, rate.use?.maxRatePerMinute);
    const leak = local("leak", rate.leakFraction, rate.use?.leakFraction);
    const terms = rate.regulators.map((g) =>
      hill(g, local(`K_${g.source}`, g.halfMax, g.use?.halfMax), local(`n_${g.source}`, g.hill, g.use?.hill)),
    );
    const f =
      terms.length === 1
        ? terms[0]
        : rate.logic === "and"
          ? apply("times", ...terms)
          : apply("minus", cn(1), apply("times", ...terms.map((h) => apply("minus", cn(1), h))));
    body = apply("times", ci(vmax), apply("plus", ci(leak), apply("times", apply("minus", cn(1), ci(leak)), f)));
  }
  if (r.scaledBy) body = apply("times", body, ci(r.scaledBy));
  return { math: `<math xmlns="http://www.w3.org/1998/Math/MathML">${body}</math>`, locals };
}

/** The input program to export with a circuit: the driven signal and its switches. */
export interface ExportProgram {
  signal: string;
  switchTimes: ArrayLike<number>;
  levels: ArrayLike<number>;
}

/** The circuit (and optionally its input program) as an SBML Level 3 Version 2 document. */
export function exportSbml(circuit: Circuit, program?: ExportProgram): string {
  if (program && !circuit.signals.some((s) => s.name === program.signal))
    throw new Error(`input signal "${program.signal}" is not a signal of the circuit`);
  const L: string[] = [];
  L.push(`<?xml version="1.0" encoding="UTF-8"?>`);
  L.push(`<sbml xmlns="http://www.sbml.org/sbml/level3/version2/core" level="3" version="2">`);
  L.push(
    `  <model id="linger_circuit" name="${esc(circuit.name)}" substanceUnits="item" timeUnits="minute" extentUnits="item" volumeUnits="litre">`,
  );
  L.push(`    <annotation>`);
  L.push(
    `      <linger:circuit xmlns:linger="${LINGER_SBML_NS}" linger:outputSpecies="${esc(circuit.outputSpecies)}" linger:description="${esc(circuit.description)}">`,
  );
  for (const s of circuit.signals)
    L.push(
      `        <linger:signal linger:id="${s.name}" linger:offLevel="${s.offLevel}" linger:onLevel="${s.onLevel}"/>`,
    );
  L.push(`      </linger:circuit>`);
  L.push(`    </annotation>`);
  L.push(`    <listOfUnitDefinitions>`);
  L.push(`      <unitDefinition id="minute">`);
  L.push(`        <listOfUnits><unit kind="second" exponent="1" scale="0" multiplier="60"/></listOfUnits>`);
  L.push(`      </unitDefinition>`);
  L.push(`    </listOfUnitDefinitions>`);
  L.push(`    <listOfCompartments>`);
  L.push(`      <compartment id="cell" spatialDimensions="3" size="1" constant="true"/>`);
  L.push(`    </listOfCompartments>`);
  L.push(`    <listOfSpecies>`);
  for (const s of circuit.species)
    L.push(
      `      <species id="${s.name}" compartment="cell" initialAmount="${s.initialCount}" hasOnlySubstanceUnits="true" boundaryCondition="false" constant="false"/>`,
    );
  L.push(`    </listOfSpecies>`);
  const assigned = new Set((circuit.events ?? []).flatMap((e) => e.assign.map((a) => a.target)));
  if (circuit.signals.length > 0 || (circuit.parameters ?? []).length > 0) {
    L.push(`    <listOfParameters>`);
    for (const s of circuit.signals)
      L.push(
        `      <parameter id="${s.name}" value="${s.offLevel}" constant="${program?.signal === s.name && program.switchTimes.length > 0 ? "false" : "true"}"/>`,
      );
    for (const q of circuit.parameters ?? [])
      L.push(
        `      <parameter id="${q.name}" value="${q.value}" constant="${assigned.has(q.name) ? "false" : "true"}"/>`,
      );
    L.push(`    </listOfParameters>`);
  }
  if ((circuit.rules ?? []).length > 0) {
    L.push(`    <listOfRules>`);
    for (const rule of circuit.rules ?? [])
      L.push(
        `      <assignmentRule variable="${rule.target}"><math xmlns="http://www.w3.org/1998/Math/MathML">${treeToMathml(treeOf(rule.value, circuit, "num", false))}</math></assignmentRule>`,
      );
    L.push(`    </listOfRules>`);
  }
  L.push(`    <listOfReactions>`);
  const speciesNames = new Set(circuit.species.map((s) => s.name));
  for (const r of circuit.reactions) {
    L.push(`      <reaction id="${r.name}" reversible="false">`);
    const refs = (list: string, entries: { species: string; count: number }[]) => {
      if (entries.length === 0) return;
      L.push(`        <${list}>`);
      for (const e of entries)
        L.push(`          <speciesReference species="${e.species}" stoichiometry="${e.count}" constant="true"/>`);
      L.push(`        </${list}>`);
    };
    refs("listOfReactants", r.reactants);
    refs("listOfProducts", r.products);
    const reactantNames = new Set(r.reactants.map((e) => e.species));
    const exprSpecies = r.rate.kind === "expression" ? [...namesRead(treeOf(r.rate.formula, circuit)).species] : [];
    const mods = [
      ...new Set([
        ...r.modifiers,
        ...(r.rate.kind === "regulated" ? r.rate.regulators.map((g) => g.source) : []),
        ...exprSpecies,
      ]),
    ].filter((m) => speciesNames.has(m) && !reactantNames.has(m));
    if (mods.length > 0) {
      L.push(`        <listOfModifiers>`);
      for (const m of mods) L.push(`          <modifierSpeciesReference species="${m}"/>`);
      L.push(`        </listOfModifiers>`);
    }
    const law = kineticLaw(r, circuit);
    L.push(`        <kineticLaw>`);
    L.push(`          ${law.math}`);
    if (law.locals.length > 0) {
      L.push(`          <listOfLocalParameters>`);
      for (const [id, v] of law.locals) L.push(`            <localParameter id="${id}" value="${v}"/>`);
      L.push(`          </listOfLocalParameters>`);
    }
    L.push(`        </kineticLaw>`);
    L.push(`      </reaction>`);
  }
  L.push(`    </listOfReactions>`);
  const events = circuit.events ?? [];
  const switches = program ? program.switchTimes.length : 0;
  if (events.length > 0 || switches > 0) {
    const math = (inner: string) => `<math xmlns="http://www.w3.org/1998/Math/MathML">${inner}</math>`;
    L.push(`    <listOfEvents>`);
    for (let k = 0; k < switches; k++) {
      const trig: ExprNode = { t: "cmp", op: ">=", a: { t: "time" }, b: { t: "num", v: program!.switchTimes[k] } };
      L.push(`      <event id="${program!.signal}_switch_${k + 1}" useValuesFromTriggerTime="true">`);
      L.push(`        <trigger initialValue="true" persistent="true">${math(treeToMathml(trig))}</trigger>`);
      L.push(
        `        <listOfEventAssignments><eventAssignment variable="${program!.signal}">${math(`<cn>${program!.levels[k]}</cn>`)}</eventAssignment></listOfEventAssignments>`,
      );
      L.push(`      </event>`);
    }
    for (const e of events) {
      const triggers: [string, ExprNode][] =
        e.at !== undefined
          ? e.at.map((t, k) => [
              e.at!.length === 1 ? e.name : `${e.name}__${k + 1}`,
              { t: "cmp", op: ">=", a: { t: "time" }, b: { t: "num", v: t } },
            ])
          : [[e.name, treeOf(e.when!, circuit, "bool")]];
      for (const [id, trig] of triggers) {
        L.push(`      <event id="${id}" useValuesFromTriggerTime="true">`);
        L.push(`        <trigger initialValue="true" persistent="true">${math(treeToMathml(trig))}</trigger>`);
        L.push(`        <listOfEventAssignments>`);
        for (const a of e.assign)
          L.push(
            `          <eventAssignment variable="${a.target}">${math(treeToMathml(treeOf(a.value, circuit, "num", false)))}</eventAssignment>`,
          );
        L.push(`        </listOfEventAssignments>`);
        L.push(`      </event>`);
      }
    }
    L.push(`    </listOfEvents>`);
  }
  L.push(`  </model>`);
  L.push(`</sbml>`);
  return L.join("\n") + "\n";
}
