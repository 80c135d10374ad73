/**
 * Semantic checks of a circuit beyond its zod schema: unknown names, duplicate
 * names, reactions that could drive a count negative, the output species.
 * Messages name the reaction and field, for example
 *   reactions[2] "degZ": reactant "Q" is not a species
 * Size limits are CIRCUIT_LIMITS in shared/schemas/circuit.ts (50 species,
 * 8 signals, 200 reactions, 6 regulators per reaction), enforced by the schema.
 */
import { CircuitSchema, type Circuit } from "@/shared/schemas/circuit";
import { describeExprError, namesRead, parseExpression, usesTime } from "./expression";

export interface ValidationError {
  path: string;
  message: string;
}
export type ValidationResult = { ok: true } | { ok: false; errors: ValidationError[] };

function zodPath(path: readonly PropertyKey[]): string {
  let out = "";
  for (const p of path) out += typeof p === "number" ? `[${p}]` : out === "" ? String(p) : `.${String(p)}`;
  return out;
}

/** Validates a circuit (raw JSON or parsed): schema first, then the semantic checks. */
export function validateCircuit(input: unknown): ValidationResult {
  const parsed = CircuitSchema.safeParse(input);
  if (!parsed.success) {
    const errors = parsed.error.issues.map((i) => {
      const path = zodPath(i.path);
      const m = /^reactions\[(\d+)\]/.exec(path);
      const raw = input as { reactions?: { name?: unknown }[] } | null;
      const rname = m && raw && Array.isArray(raw.reactions) ? raw.reactions[Number(m[1])]?.name : undefined;
      const prefix = m
        ? `reactions[${m[1]}]${typeof rname === "string" ? ` "${rname}"` : ""}: `
        : path
          ? `${path}: `
          : "";
      return { path, message: `${prefix}${i.message}` };
    });
    return { ok: false, errors };
  }
  const errors = semanticErrors(parsed.data);
  return errors.length === 0 ? { ok: true } : { ok: false, errors };
}

export function semanticErrors(c: Circuit): ValidationError[] {
  const errors: ValidationError[] = [];
  const species = new Set<string>();
  const signals = new Set<string>();
  c.species.forEach((s, i) => {
    if (species.has(s.name))
      errors.push({ path: `species[${i}].name`, message: `species[${i}]: duplicate species name "${s.name}"` });
    species.add(s.name);
  });
  c.signals.forEach((s, i) => {
    if (signals.has(s.name))
      errors.push({ path: `signals[${i}].name`, message: `signals[${i}]: duplicate signal name "${s.name}"` });
    if (species.has(s.name))
      errors.push({ path: `signals[${i}].name`, message: `signals[${i}]: "${s.name}" is already a species name` });
    signals.add(s.name);
  });
  const params = new Map<string, number>();
  (c.parameters ?? []).forEach((q, i) => {
    const at = `parameters[${i}]`;
    if (params.has(q.name)) errors.push({ path: `${at}.name`, message: `${at}: duplicate parameter name "${q.name}"` });
    else if (species.has(q.name) || signals.has(q.name))
      errors.push({
        path: `${at}.name`,
        message: `${at}: "${q.name}" is already a ${species.has(q.name) ? "species" : "signal"} name`,
      });
    else if (q.name === "time")
      errors.push({ path: `${at}.name`, message: `${at}: "time" is reserved for the clock in expressions` });
    params.set(q.name, q.value);
  });
  /** A fixed-kind field that follows a parameter must exist and hold its value. */
  const follows = (path: string, who: string, field: string, name: string | undefined, value: number) => {
    if (name === undefined) return;
    if (!params.has(name))
      errors.push({ path, message: `${who}: ${field} follows "${name}", which is not a parameter of the circuit` });
    else if (params.get(name) !== value)
      errors.push({
        path,
        message: `${who}: ${field} is ${value} but it follows parameter "${name}" = ${params.get(name)}; give the same value`,
      });
  };
  if (!species.has(c.outputSpecies))
    errors.push({ path: "outputSpecies", message: `output species "${c.outputSpecies}" is not a species` });
  const reactionNames = new Set<string>();
  c.reactions.forEach((r, i) => {
    const at = `reactions[${i}]`;
    const who = `${at} "${r.name}"`;
    if (reactionNames.has(r.name)) errors.push({ path: `${at}.name`, message: `${who}: duplicate reaction name` });
    reactionNames.add(r.name);
    const seen = new Set<string>();
    r.reactants.forEach((e, k) => {
      if (!species.has(e.species))
        errors.push({
          path: `${at}.reactants[${k}].species`,
          message: `${who}: reactant "${e.species}" is not a species`,
        });
      if (seen.has(e.species))
        errors.push({
          path: `${at}.reactants[${k}].species`,
          message: `${who}: reactant "${e.species}" is listed twice; list it once with count 2`,
        });
      seen.add(e.species);
    });
    const order = r.reactants.reduce((s, e) => s + e.count, 0);
    if (order > 2)
      errors.push({ path: `${at}.reactants`, message: `${who}: reactants: at most order 2 (two molecules in total)` });
    r.products.forEach((e, k) => {
      if (!species.has(e.species))
        errors.push({
          path: `${at}.products[${k}].species`,
          message: `${who}: product "${e.species}" is not a species`,
        });
    });
    r.modifiers.forEach((m, k) => {
      if (!species.has(m) && !signals.has(m))
        errors.push({ path: `${at}.modifiers[${k}]`, message: `${who}: modifier "${m}" is not a species or signal` });
    });
    if (r.scaledBy !== undefined && !signals.has(r.scaledBy))
      errors.push({ path: `${at}.scaledBy`, message: `${who}: scaledBy "${r.scaledBy}" is not a signal` });
    const rate = r.rate;
    if (rate.kind === "massAction" || rate.kind === "constant")
      follows(`${at}.rate.use.ratePerMinute`, who, "rate", rate.use?.ratePerMinute, rate.ratePerMinute);
    if (rate.kind === "regulated") {
      follows(
        `${at}.rate.use.maxRatePerMinute`,
        who,
        "maximal rate",
        rate.use?.maxRatePerMinute,
        rate.maxRatePerMinute,
      );
      follows(`${at}.rate.use.leakFraction`, who, "leak", rate.use?.leakFraction, rate.leakFraction);
      rate.regulators.forEach((g, k) => {
        const gp = `${at}.rate.regulators[${k}].use`;
        follows(`${gp}.halfMax`, who, `half-max K of ${g.source}`, g.use?.halfMax, g.halfMax);
        follows(`${gp}.hill`, who, `Hill coefficient of ${g.source}`, g.use?.hill, g.hill);
      });
    }
    if (rate.kind === "expression") {
      const res = parseExpression(rate.formula, { species, signals, params: new Set(params.keys()) });
      if (!res.ok)
        errors.push({ path: `${at}.rate.formula`, message: `${who}: formula ${describeExprError(res.error)}` });
    }
    if (r.rate.kind !== "massAction" && r.rate.kind !== "expression" && r.reactants.length > 0)
      errors.push({
        path: `${at}.reactants`,
        message: `${who}: reactants: a ${r.rate.kind} rate does not depend on its reactants, so it could drive a count negative; use mass action or move them to modifiers`,
      });
    if (r.rate.kind === "regulated") {
      const regs = new Set<string>();
      r.rate.regulators.forEach((g, k) => {
        if (!species.has(g.source) && !signals.has(g.source))
          errors.push({
            path: `${at}.rate.regulators[${k}].source`,
            message: `${who}: regulator "${g.source}" is not a species or signal`,
          });
        if (regs.has(g.source))
          errors.push({
            path: `${at}.rate.regulators[${k}].source`,
            message: `${who}: regulator "${g.source}" is listed twice`,
          });
        regs.add(g.source);
      });
    }
  });
  const changedByReactions = new Set(
    c.reactions.flatMap((r) => {
      const net = new Map<string, number>();
      for (const e of r.reactants) net.set(e.species, (net.get(e.species) ?? 0) - e.count);
      for (const e of r.products) net.set(e.species, (net.get(e.species) ?? 0) + e.count);
      return [...net].filter(([, n]) => n !== 0).map(([s]) => s);
    }),
  );
  const ruleTargets = new Set<string>();
  const laterTargets = new Set((c.rules ?? []).map((r) => r.target));
  (c.rules ?? []).forEach((rule, i) => {
    const at = `rules[${i}]`;
    const who = `${at} "${rule.target}"`;
    laterTargets.delete(rule.target);
    if (!species.has(rule.target))
      errors.push({ path: `${at}.target`, message: `${who}: rule target "${rule.target}" is not a species` });
    else if (ruleTargets.has(rule.target))
      errors.push({ path: `${at}.target`, message: `${who}: "${rule.target}" already has a rule` });
    else if (changedByReactions.has(rule.target))
      errors.push({
        path: `${at}.target`,
        message: `${who}: "${rule.target}" is changed by a reaction, so a rule cannot also set it`,
      });
    ruleTargets.add(rule.target);
    const res = parseExpression(rule.value, {
      species,
      signals: new Set(),
      params: new Set(params.keys()),
      allowTime: false,
    });
    if (!res.ok) errors.push({ path: `${at}.value`, message: `${who}: value ${describeExprError(res.error)}` });
    else {
      const read = namesRead(res.tree).species;
      const bad = [...read].find((n) => n === rule.target || laterTargets.has(n));
      if (bad !== undefined)
        errors.push({
          path: `${at}.value`,
          message: `${who}: value reads "${bad}", ${bad === rule.target ? "its own target" : "the target of a later rule"}; order the rules so each reads only earlier ones`,
        });
    }
  });
  const eventNames = new Set<string>();
  const pscope = () => ({ species, signals, params: new Set(params.keys()) });
  (c.events ?? []).forEach((e, i) => {
    const at = `events[${i}]`;
    const who = `${at} "${e.name}"`;
    if (eventNames.has(e.name)) errors.push({ path: `${at}.name`, message: `${who}: duplicate event name` });
    eventNames.add(e.name);
    if (e.when !== undefined) {
      const res = parseExpression(e.when, pscope(), "bool");
      if (!res.ok) errors.push({ path: `${at}.when`, message: `${who}: condition ${describeExprError(res.error)}` });
      else {
        const names = namesRead(res.tree);
        if (names.signals.size > 0)
          errors.push({
            path: `${at}.when`,
            message: `${who}: condition reads signal "${[...names.signals][0]}"; a condition may read species and parameters, or time`,
          });
        else if (usesTime(res.tree) && (names.species.size > 0 || names.params.size > 0))
          errors.push({
            path: `${at}.when`,
            message: `${who}: condition mixes time with species or parameters; use one condition on species or one on time`,
          });
      }
    }
    e.assign.forEach((a, k) => {
      const ap = `${at}.assign[${k}]`;
      if (ruleTargets.has(a.target))
        errors.push({
          path: `${ap}.target`,
          message: `${who}: "${a.target}" is set by an assignment rule, so an event cannot set it`,
        });
      else if (!species.has(a.target) && !params.has(a.target))
        errors.push({
          path: `${ap}.target`,
          message: `${who}: assignment target "${a.target}" is not a species or parameter${signals.has(a.target) ? " (signals are set by the input program)" : ""}`,
        });
      const res = parseExpression(a.value, { ...pscope(), allowTime: false });
      if (!res.ok)
        errors.push({ path: `${ap}.value`, message: `${who}: value of ${a.target} ${describeExprError(res.error)}` });
    });
  });
  return errors;
}
