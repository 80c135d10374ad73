/**
 * SBML Level 3 (Versions 1 and 2) Core import into a Linger circuit (Hucka et
 * al. 2019, J Integr Bioinform 16:20190021, for the element definitions), and
 * Level 2 Version 4 where it differs little: the same elements, local
 * parameters in the kinetic law's listOfParameters, Level 2 defaults
 * (hasOnlySubstanceUnits, boundaryCondition and constant false, stoichiometry
 * 1), and a reaction without reversible="false" refused as reversible (the
 * Level 2 default); compartment and species types are refused.
 *
 * Supported: compartments (sizes as constants), species (amounts; a species
 * with hasOnlySubstanceUnits="false" stands for amount / compartment size inside
 * kinetic laws), boundary and constant species (never changed by reactions; they
 * enter rates as their initial value), global and local parameters, initial
 * assignments evaluating to constants, reactions with whole stoichiometries,
 * and kinetic laws: those that equal one of Linger's fixed kinds exactly
 *   constant c (no reactants), k*A, k*A*B, k*A*(A-1)/2 (as a polynomial in the
 *   changing species' amounts, after folding every constant in)
 * become that kind; any other law becomes an expression rate (./mathml-tree.ts;
 * MathML log without a base is base 10), with the global parameters it reads in
 * the circuit's parameter table, compartments and local parameters as numbers.
 * Events without delay or priority become Linger events (trigger on species or
 * on time alone; assignments to species amounts or global parameters; a law
 * that reads a parameter some event assigns is always an expression).
 * In the stochastic reading of SBML the kinetic law is the propensity in
 * molecules per model time unit; Linger reads the model time unit as minutes.
 *
 * Assignment rules on species become Linger assignment rules.
 * Everything else (rate and algebraic rules, rules on parameters or
 * compartments, function definitions, constraints, delays,
 * priorities, packages, other levels and versions) is refused: the result lists
 * every refused element with its id, line and reason, and no circuit is made.
 */
import {
  CircuitSchema,
  NameSchema,
  type Circuit,
  type CircuitEvent,
  type Parameter,
  type Reaction,
  type StoichEntry,
} from "@/shared/schemas/circuit";
import { semanticErrors } from "@/sim/circuit/validate-circuit";
import {
  constantValue,
  MathRefusal,
  polynomialFromTerms,
  samePolynomial,
  toPolynomial,
  type SymbolValue,
} from "./mathml";
import { child, parseXml, XmlSyntaxError, type XmlElement } from "./xml";
import { mathmlToTree } from "./mathml-tree";
import { evaluateTree, parseExpression, treeToText, type ExprNode } from "@/sim/circuit/expression";

export interface SbmlProblem {
  /** The SBML element name (species, reaction, kineticLaw, ...). */
  element: string;
  /** Its id attribute (or metaid / symbol / variable) where it has one. */
  id: string | null;
  line: number;
  reason: string;
}

export type SbmlImport =
  | {
      ok: true;
      circuit: Circuit;
      notes: string[];
      level: number;
      version: number;
      /** The model's compartments with their sizes (after initial assignments); they enter laws as numbers. */
      compartments: { id: string; size: number }[];
    }
  | { ok: false; problems: SbmlProblem[] };

const SUPPORTED_MODEL_CHILDREN = new Set([
  "notes",
  "annotation",
  "listOfUnitDefinitions",
  "listOfCompartments",
  "listOfSpecies",
  "listOfParameters",
  "listOfInitialAssignments",
  "listOfReactions",
  "listOfEvents",
  "listOfRules",
]);

const REFUSED_REASONS: Record<string, string> = {
  listOfFunctionDefinitions: "function definitions are not supported",
  listOfConstraints: "constraints are not supported",
  listOfCompartmentTypes: "compartment types (Level 2) are not supported",
  listOfSpeciesTypes: "species types (Level 2) are not supported",
};

function idOf(el: XmlElement): string | null {
  return el.attrs.id ?? el.attrs.symbol ?? el.attrs.variable ?? el.attrs.metaid ?? null;
}

function num(el: XmlElement, attr: string, problems: SbmlProblem[]): number | undefined {
  const raw = el.attrs[attr];
  if (raw === undefined) return undefined;
  const v = Number(raw);
  if (raw.trim() === "" || !Number.isFinite(v)) {
    problems.push({ element: el.name, id: idOf(el), line: el.line, reason: `${attr}="${raw}" is not a finite number` });
    return undefined;
  }
  return v;
}

function listItems(model: XmlElement, list: string, item: string): XmlElement[] {
  return (child(model, list)?.children ?? []).filter((c) => c.name === item);
}

interface SpeciesInfo {
  el: XmlElement;
  id: string;
  compartment: string;
  amount: number | undefined;
  concentration: number | undefined;
  onlySubstance: boolean;
  fixed: boolean;
}

/** Imports an SBML document from a string. Never throws for bad input: problems come back in the result. */
export function importSbml(source: string): SbmlImport {
  let root: XmlElement;
  try {
    root = parseXml(source);
  } catch (e) {
    const line = e instanceof XmlSyntaxError ? e.line : 1;
    return { ok: false, problems: [{ element: "sbml", id: null, line, reason: (e as Error).message }] };
  }
  const problems: SbmlProblem[] = [];
  const refuse = (el: XmlElement, reason: string, id: string | null = idOf(el)) =>
    problems.push({ element: el.name, id, line: el.line, reason });
  if (root.name !== "sbml") {
    refuse(root, `the document element is <${root.name}>, not <sbml>`);
    return { ok: false, problems };
  }
  const level = Number(root.attrs.level);
  const version = Number(root.attrs.version);
  const l2 = level === 2 && version === 4;
  if (!l2 && (level !== 3 || (version !== 1 && version !== 2))) {
    refuse(
      root,
      `SBML Level ${root.attrs.level} Version ${root.attrs.version}: Linger reads Level 3 Versions 1 and 2, and Level 2 Version 4`,
    );
    return { ok: false, problems };
  }
  for (const [attr, value] of Object.entries(root.attrs))
    if (attr.endsWith(":required"))
      refuse(root, `SBML package "${attr.split(":")[0]}" (required="${value}") is not supported`);
  const model = child(root, "model");
  if (!model) {
    refuse(root, "the document has no <model>");
    return { ok: false, problems };
  }
  for (const c of model.children) {
    if (REFUSED_REASONS[c.name]) {
      const items = c.children.filter((x) => x.name !== "notes" && x.name !== "annotation");
      if (items.length === 0) continue;
      for (const it of items) refuse(it, REFUSED_REASONS[c.name]);
    } else if (!SUPPORTED_MODEL_CHILDREN.has(c.name)) refuse(c, `<${c.name}> is not supported`);
  }
  const notes: string[] = [];
  if (model.attrs.timeUnits && model.attrs.timeUnits !== "minute")
    notes.push(`model time unit "${model.attrs.timeUnits}" is read as minutes; rates are per model time unit`);
  if (l2)
    notes.push(
      "SBML Level 2 Version 4: the model's time unit (seconds unless redefined) is read as minutes; rates are per model time unit",
    );

  // Constants: compartments and parameters (initial assignments may replace them).
  const constants = new Map<string, number>();
  const constantEls = new Map<string, XmlElement>();
  const declared = new Set<string>();
  const declare = (el: XmlElement) => {
    const id = el.attrs.id;
    if (!id) {
      refuse(el, `<${el.name}> has no id`);
      return null;
    }
    if (declared.has(id)) refuse(el, `id "${id}" is declared twice`);
    declared.add(id);
    return id;
  };
  for (const el of listItems(model, "listOfCompartments", "compartment")) {
    const id = declare(el);
    const size = num(el, "size", problems);
    if (id && size !== undefined) constants.set(id, size);
    if (id) constantEls.set(id, el);
  }
  for (const el of listItems(model, "listOfParameters", "parameter")) {
    const id = declare(el);
    const value = num(el, "value", problems);
    if (id && value !== undefined) constants.set(id, value);
    if (id) constantEls.set(id, el);
  }
  const species = new Map<string, SpeciesInfo>();
  for (const el of listItems(model, "listOfSpecies", "species")) {
    const id = declare(el);
    if (!id) continue;
    const info: SpeciesInfo = {
      el,
      id,
      compartment: el.attrs.compartment ?? "",
      amount: num(el, "initialAmount", problems),
      concentration: num(el, "initialConcentration", problems),
      onlySubstance: el.attrs.hasOnlySubstanceUnits === "true",
      fixed: el.attrs.boundaryCondition === "true" || el.attrs.constant === "true",
    };
    if (!constantEls.has(info.compartment) || constantEls.get(info.compartment)!.name !== "compartment")
      refuse(el, `compartment "${info.compartment}" is not a compartment of the model`);
    if (el.attrs.conversionFactor) refuse(el, "conversion factors are not supported");
    const name = NameSchema.safeParse(id);
    if (!name.success) refuse(el, `id "${id}" cannot be a Linger species name: ${name.error.issues[0].message}`);
    species.set(id, info);
  }
  for (const list of ["listOfCompartments", "listOfParameters"])
    for (const el of child(model, list)?.children ?? [])
      if (el.name !== "compartment" && el.name !== "parameter" && el.name !== "notes" && el.name !== "annotation")
        refuse(el, `<${el.name}> is not expected in <${list}>`);

  // Initial assignments: each must evaluate to a constant from values known so far.
  const speciesAssigned = new Map<string, number>();
  const constResolve =
    (local?: Map<string, number>) =>
    (id: string, line: number): SymbolValue => {
      if (local?.has(id)) return { kind: "constant", value: local.get(id)! };
      if (constants.has(id)) return { kind: "constant", value: constants.get(id)! };
      const s = species.get(id);
      if (s) {
        const amount = speciesAmount(s);
        if (amount === undefined) throw new MathRefusal(`species "${id}" has no initial value`, line);
        const size = constants.get(s.compartment);
        if (!s.onlySubstance) {
          if (size === undefined || size <= 0)
            throw new MathRefusal(`compartment "${s.compartment}" of species "${id}" has no positive size`, line);
          return { kind: "constant", value: amount / size };
        }
        return { kind: "constant", value: amount };
      }
      throw new MathRefusal(`"${id}" is not a compartment, parameter or species with a value`, line);
    };
  const speciesAmount = (s: SpeciesInfo): number | undefined => {
    if (speciesAssigned.has(s.id)) return speciesAssigned.get(s.id);
    if (s.amount !== undefined) return s.amount;
    const size = constants.get(s.compartment);
    if (s.concentration !== undefined && size !== undefined) return s.concentration * size;
    return undefined;
  };
  for (const el of listItems(model, "listOfInitialAssignments", "initialAssignment")) {
    const symbol = el.attrs.symbol ?? "";
    const math = child(el, "math");
    if (!math) {
      refuse(el, "initial assignment without <math>");
      continue;
    }
    try {
      const value = constantValue(toPolynomial(math, constResolve()));
      if (value === null) throw new MathRefusal("does not evaluate to a constant", el.line);
      if (species.has(symbol)) {
        const s = species.get(symbol)!;
        speciesAssigned.set(symbol, s.onlySubstance ? value : value * (constants.get(s.compartment) ?? NaN));
      } else if (constantEls.has(symbol)) constants.set(symbol, value);
      else refuse(el, `symbol "${symbol}" is not a compartment, parameter or species`);
    } catch (e) {
      if (!(e instanceof MathRefusal)) throw e;
      problems.push({ element: el.name, id: symbol, line: e.line, reason: `initial assignment: ${e.message}` });
    }
  }

  const circuitSpecies: Circuit["species"] = [];
  for (const s of species.values()) {
    const amount = speciesAmount(s);
    if (amount === undefined)
      refuse(
        s.el,
        "species has no initial amount (initialAmount, initialConcentration with a compartment size, or an initial assignment)",
      );
    else if (!Number.isInteger(Math.round(amount * 1e9) / 1e9) || amount < 0)
      refuse(s.el, `initial amount ${amount} is not a whole number of molecules >= 0`);
    else circuitSpecies.push({ name: s.id, initialCount: Math.round(amount) });
  }

  // Global parameters that expressions or events read or set become circuit parameters.
  const isParam = (id: string) => constantEls.get(id)?.name === "parameter";
  const usedParams = new Set<string>();
  const eventEls = listItems(model, "listOfEvents", "event");
  const assignedParams = new Set(
    eventEls.flatMap((e) =>
      (child(e, "listOfEventAssignments")?.children ?? []).map((a) => a.attrs.variable ?? "").filter(isParam),
    ),
  );
  const ciIds = (el: XmlElement): string[] => (el.name === "ci" ? [el.text] : el.children.flatMap((c) => ciIds(c)));
  /** A <ci> in an expression: species amount (/ size for a concentration), parameter name or number. */
  const exprResolve =
    (local: Map<string, number>, rid: string | null) =>
    (id: string, line: number): ExprNode => {
      if (local.has(id)) return { t: "num", v: local.get(id)! };
      const s = species.get(id);
      if (s && !s.fixed) {
        const node: ExprNode = { t: "name", kind: "species", name: id };
        if (s.onlySubstance) return node;
        const size = constants.get(s.compartment);
        if (size === undefined || size <= 0)
          throw new MathRefusal(`compartment "${s.compartment}" of species "${id}" has no positive size`, line);
        return size === 1 ? node : { t: "bin", op: "/", a: node, b: { t: "num", v: size } };
      }
      if (rid !== null && id === rid)
        throw new MathRefusal(`the reaction's own id "${id}" cannot appear in its kinetic law`, line);
      if (isParam(id) && constants.has(id)) {
        const name = NameSchema.safeParse(id);
        if (!name.success || id === "time")
          throw new MathRefusal(`parameter id "${id}" cannot be a Linger parameter name`, line);
        usedParams.add(id);
        return { t: "name", kind: "param", name: id };
      }
      const v = constResolve()(id, line);
      return { t: "num", v: v.kind === "constant" ? v.value : NaN };
    };
  const exprScope = () => ({
    species: new Set([...species.values()].filter((s) => !s.fixed).map((s) => s.id)),
    signals: new Set<string>(),
    params: new Set(usedParams),
  });

  // Reactions.
  const reactions: Reaction[] = [];
  for (const el of listItems(model, "listOfReactions", "reaction")) {
    const rid = declare(el);
    if (!rid) continue;
    const before = problems.length;
    const rname = NameSchema.safeParse(rid);
    if (!rname.success) refuse(el, `id "${rid}" cannot be a Linger reaction name: ${rname.error.issues[0].message}`);
    if (el.attrs.reversible === "true")
      refuse(el, 'reversible="true" needs a kinetic law per direction: give two irreversible reactions');
    else if (l2 && el.attrs.reversible === undefined)
      refuse(
        el,
        'no reversible attribute: in Level 2 a reaction is reversible by default; give reversible="false" (or two irreversible reactions)',
      );
    if (el.attrs.fast === "true") refuse(el, 'fast="true" reactions are not supported');
    const side = (list: string): StoichEntry[] => {
      const entries: StoichEntry[] = [];
      for (const ref of child(el, list)?.children ?? []) {
        if (ref.name === "notes" || ref.name === "annotation") continue;
        if (ref.name !== "speciesReference") {
          refuse(ref, `<${ref.name}> is not expected in <${list}>`, ref.attrs.id ?? rid);
          continue;
        }
        const s = species.get(ref.attrs.species ?? "");
        if (!s) {
          refuse(ref, `species "${ref.attrs.species}" is not a species of the model`, ref.attrs.id ?? rid);
          continue;
        }
        if (child(ref, "stoichiometryMath")) refuse(ref, "stoichiometryMath is not supported", ref.attrs.id ?? rid);
        const count = num(ref, "stoichiometry", problems) ?? 1;
        if (s.fixed) {
          if (s.el.attrs.boundaryCondition !== "true")
            refuse(
              ref,
              `species "${s.id}" is constant but not a boundary species, so no reaction may change it`,
              ref.attrs.id ?? rid,
            );
          continue; // boundary species are not changed by reactions
        }
        if (count !== 1 && count !== 2)
          refuse(ref, `stoichiometry ${count} of "${s.id}": Linger takes 1 or 2`, ref.attrs.id ?? rid);
        const seen = entries.find((e) => e.species === s.id);
        if (seen) {
          seen.count += count;
          if (seen.count > 2)
            refuse(ref, `"${s.id}" totals stoichiometry ${seen.count}: Linger takes 1 or 2`, ref.attrs.id ?? rid);
        } else entries.push({ species: s.id, count });
      }
      return entries;
    };
    const reactants = side("listOfReactants");
    const products = side("listOfProducts");
    const modifiers = [
      ...new Set(
        (child(el, "listOfModifiers")?.children ?? [])
          .filter((m) => m.name === "modifierSpeciesReference")
          .map((m) => m.attrs.species ?? "")
          .filter((m) => species.has(m) && !species.get(m)!.fixed),
      ),
    ];
    const order = reactants.reduce((a, e) => a + e.count, 0);
    if (reactants.length > 2 || order > 2)
      refuse(el, `reaction order ${order}: Linger's mass action takes at most 2 reactant molecules`);
    const law = child(el, "kineticLaw");
    const math = law && child(law, "math");
    if (!law || !math) {
      refuse(el, "reaction has no kinetic law");
      continue;
    }
    const local = new Map<string, number>();
    for (const list of ["listOfLocalParameters", "listOfParameters"])
      for (const p of child(law, list)?.children ?? []) {
        if (p.name !== "localParameter" && p.name !== "parameter") continue;
        const v = num(p, "value", problems);
        if (!p.attrs.id || v === undefined) refuse(p, "local parameter needs an id and a value");
        else local.set(p.attrs.id, v);
      }
    const resolve = (id: string, line: number): SymbolValue => {
      if (local.has(id)) return { kind: "constant", value: local.get(id)! };
      const s = species.get(id);
      if (s && !s.fixed) {
        let scale = 1;
        if (!s.onlySubstance) {
          const size = constants.get(s.compartment);
          if (size === undefined || size <= 0)
            throw new MathRefusal(`compartment "${s.compartment}" of species "${id}" has no positive size`, line);
          scale = 1 / size;
        }
        return { kind: "species", id, scale };
      }
      if (id === rid) throw new MathRefusal(`the reaction's own id "${id}" cannot appear in its kinetic law`, line);
      return constResolve()(id, line);
    };
    let rate: Reaction["rate"] | null = null;
    try {
      if (ciIds(math).some((id) => assignedParams.has(id) && !local.has(id)))
        throw new MathRefusal("reads a parameter that an event assigns", law.line);
      const poly = toPolynomial(math, resolve);
      const k = reactants.length === 0 ? constantValue(poly) : leadingCoefficient(poly, reactants);
      if (k === null) throw new MathRefusal(lawMismatch(reactants), law.line);
      const expected =
        reactants.length === 0
          ? polynomialFromTerms([[[], k]])
          : reactants.length === 2
            ? polynomialFromTerms([[[reactants[0].species, reactants[1].species], k]])
            : reactants[0].count === 1
              ? polynomialFromTerms([[[reactants[0].species], k]])
              : polynomialFromTerms([
                  [[reactants[0].species, reactants[0].species], k / 2],
                  [[reactants[0].species], -k / 2],
                ]);
      if (!samePolynomial(poly, expected)) throw new MathRefusal(lawMismatch(reactants), law.line);
      if (k < 0) throw new MathRefusal(`the rate constant evaluates to ${k}, which is negative`, law.line);
      rate = reactants.length === 0 ? { kind: "constant", ratePerMinute: k } : { kind: "massAction", ratePerMinute: k };
    } catch (e) {
      if (!(e instanceof MathRefusal)) throw e;
      // not a fixed kind: an expression rate
      try {
        const tree = mathmlToTree(math, exprResolve(local, rid));
        const formula = treeToText(tree);
        const check = parseExpression(formula, exprScope());
        if (!check.ok) throw new MathRefusal(`as an expression: ${check.error.message}`, law.line);
        rate = { kind: "expression", formula };
      } catch (e2) {
        if (!(e2 instanceof MathRefusal)) throw e2;
        problems.push({ element: "kineticLaw", id: rid, line: e2.line, reason: e2.message });
      }
    }
    if (problems.length === before && rate) reactions.push({ name: rid, reactants, products, modifiers, rate });
  }

  // Events.
  const events: CircuitEvent[] = [];
  for (const el of eventEls) {
    const eid = el.attrs.id ?? `event${events.length + 1}`;
    const ename = NameSchema.safeParse(eid);
    if (!ename.success) refuse(el, `id "${eid}" cannot be a Linger event name: ${ename.error.issues[0].message}`, eid);
    if (child(el, "delay")) refuse(el, "event delays are not supported", eid);
    if (child(el, "priority"))
      refuse(el, "event priorities are not supported (Linger fires events in list order)", eid);
    const trig = child(el, "trigger");
    const tmath = trig && child(trig, "math");
    if (!trig || !tmath) {
      refuse(el, "event has no trigger", eid);
      continue;
    }
    try {
      const cond = mathmlToTree(tmath, exprResolve(new Map(), null));
      const when = treeToText(cond);
      const check = parseExpression(when, exprScope(), "bool");
      if (!check.ok) throw new MathRefusal(`trigger: ${check.error.message}`, trig.line);
      // initialValue="false" with a trigger already true at t = 0 fires at t = 0 in SBML; Linger fires only
      // on a rise after t = 0 (initialValue="true"), so such a model is refused rather than run differently.
      // (persistent matters only with a delay, and delays are refused.)
      if (trig.attrs.initialValue === "false") {
        const startValue = (kind: "species" | "signal" | "param", name: string): number => {
          const sp = kind === "species" ? species.get(name) : undefined;
          if (sp) return speciesAmount(sp) ?? NaN;
          return kind === "param" ? (constants.get(name) ?? NaN) : NaN;
        };
        if (evaluateTree(check.tree, startValue, 0) === true)
          throw new MathRefusal(
            'trigger is already true at t = 0 and initialValue="false": SBML fires the event at t = 0, Linger fires an event only when its trigger turns true after t = 0',
            trig.line,
          );
      }
      const assign: CircuitEvent["assign"] = [];
      for (const a of child(el, "listOfEventAssignments")?.children ?? []) {
        if (a.name !== "eventAssignment") continue;
        const target = a.attrs.variable ?? "";
        const amath = child(a, "math");
        if (!amath) throw new MathRefusal(`assignment to "${target}" has no <math>`, a.line);
        let value = mathmlToTree(amath, exprResolve(new Map(), null));
        const s = species.get(target);
        if (s) {
          if (s.fixed)
            throw new MathRefusal(
              `species "${target}" is a boundary or constant species; events may not set it`,
              a.line,
            );
          if (!s.onlySubstance) {
            const size = constants.get(s.compartment) ?? NaN;
            if (size !== 1) value = { t: "bin", op: "*", a: value, b: { t: "num", v: size } };
          }
        } else if (isParam(target)) usedParams.add(target);
        else throw new MathRefusal(`assignment target "${target}" is not a species or parameter`, a.line);
        const text = treeToText(value);
        const vcheck = parseExpression(text, { ...exprScope(), allowTime: false });
        if (!vcheck.ok) throw new MathRefusal(`assignment to "${target}": ${vcheck.error.message}`, a.line);
        assign.push({ target, value: text });
      }
      if (assign.length === 0) throw new MathRefusal("event has no assignments", el.line);
      events.push({ name: eid, when, assign });
    } catch (e) {
      if (!(e instanceof MathRefusal)) throw e;
      problems.push({ element: "event", id: eid, line: e.line, reason: e.message });
    }
  }

  // Assignment rules on species become Linger rules; other rules are refused.
  const rules: { target: string; value: string }[] = [];
  for (const el of child(model, "listOfRules")?.children ?? []) {
    if (el.name === "notes" || el.name === "annotation") continue;
    const target = el.attrs.variable ?? "";
    if (el.name !== "assignmentRule") {
      refuse(
        el,
        `${el.name === "rateRule" ? "rate rules" : el.name === "algebraicRule" ? "algebraic rules" : `<${el.name}>`} are not supported`,
        target || null,
      );
      continue;
    }
    const s = species.get(target);
    if (!s || s.fixed) {
      refuse(el, `assignment rules are supported for non-boundary species only; "${target}" is not one`, target);
      continue;
    }
    const math = child(el, "math");
    try {
      if (!math) throw new MathRefusal("assignment rule without <math>", el.line);
      let value = mathmlToTree(math, exprResolve(new Map(), null));
      if (!s.onlySubstance) {
        const size = constants.get(s.compartment) ?? NaN;
        if (size !== 1) value = { t: "bin", op: "*", a: value, b: { t: "num", v: size } };
      }
      const text = treeToText(value);
      const check = parseExpression(text, { ...exprScope(), allowTime: false });
      if (!check.ok) throw new MathRefusal(`assignment rule: ${check.error.message}`, el.line);
      rules.push({ target, value: text });
    } catch (e) {
      if (!(e instanceof MathRefusal)) throw e;
      problems.push({ element: el.name, id: target, line: e.line, reason: e.message });
    }
  }

  if (problems.length > 0) return { ok: false, problems };
  const parameters: Parameter[] = [...usedParams].map((id) => ({ name: id, value: constants.get(id)! }));
  const output = [...species.values()].find((s) => !s.fixed) ?? [...species.values()][0];
  const candidate = {
    name: (model.attrs.name || model.attrs.id || "Imported SBML model").slice(0, 120),
    description: `Imported from SBML Level ${level} Version ${version}${model.attrs.id ? ` (model id "${model.attrs.id}")` : ""}.`,
    species: circuitSpecies,
    signals: [],
    reactions,
    ...(parameters.length > 0 ? { parameters } : {}),
    ...(events.length > 0 ? { events } : {}),
    ...(rules.length > 0 ? { rules } : {}),
    outputSpecies: output?.id ?? "",
  };
  const parsed = CircuitSchema.safeParse(candidate);
  if (!parsed.success)
    return {
      ok: false,
      problems: parsed.error.issues.map((i) => ({
        element: "model",
        id: model.attrs.id ?? null,
        line: model.line,
        reason: `${i.path.join(".")}: ${i.message}`,
      })),
    };
  const semantic = semanticErrors(parsed.data);
  if (semantic.length > 0)
    return {
      ok: false,
      problems: semantic.map((s) => ({
        element: "model",
        id: model.attrs.id ?? null,
        line: model.line,
        reason: s.message,
      })),
    };
  const compartments = [...constantEls.entries()]
    .filter(([id, el]) => el.name === "compartment" && constants.has(id))
    .map(([id]) => ({ id, size: constants.get(id)! }));
  return { ok: true, circuit: parsed.data, notes, level, version, compartments };
}

/** The coefficient of the reactants' propensity monomial (A, A*B, or A*A for 2A). */
function leadingCoefficient(poly: Map<string, number>, reactants: StoichEntry[]): number | null {
  const names = reactants.flatMap((r) => Array<string>(r.count).fill(r.species)).sort();
  const c = poly.get(names.join("*"));
  if (c === undefined) return null;
  return reactants.length === 1 && reactants[0].count === 2 ? 2 * c : c;
}

function lawMismatch(reactants: StoichEntry[]): string {
  if (reactants.length === 0)
    return "kinetic law is not a constant rate (a reaction without reactants needs a constant propensity)";
  if (reactants.length === 2)
    return `kinetic law is not mass action k*${reactants[0].species}*${reactants[1].species} (Linger's fixed rate kinds)`;
  const a = reactants[0].species;
  return reactants[0].count === 1
    ? `kinetic law is not mass action k*${a} (Linger's fixed rate kinds)`
    : `kinetic law is not mass action k*${a}*(${a}-1)/2 (Linger's fixed rate kinds)`;
}

/** One line per problem: `<element> "id" (line N): reason`. */
export function formatSbmlProblems(problems: SbmlProblem[]): string {
  return problems.map((p) => `${p.element}${p.id ? ` "${p.id}"` : ""} (line ${p.line}): ${p.reason}`).join("\n");
}
