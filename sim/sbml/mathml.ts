/**
 * The part of MathML (content markup, as SBML Level 3 uses it) that Linger's
 * fixed rate kinds can express: numbers, identifiers, and + - * / and integer
 * powers. A kinetic law is reduced to a polynomial in the amounts of the
 * species that change; every other symbol must have a constant value.
 */
import type { XmlElement } from "./xml";

export class MathRefusal extends Error {
  constructor(
    message: string,
    readonly line: number,
  ) {
    super(message);
  }
}

/** A polynomial: monomial key (species ids joined by "*", sorted; "" for the constant) -> coefficient. */
export type Polynomial = Map<string, number>;

/** What a symbol in a formula stands for. */
export type SymbolValue =
  | { kind: "constant"; value: number }
  /** A species amount, times `scale` (1 / compartment size for a concentration). */
  | { kind: "species"; id: string; scale: number };

const keyOf = (factors: string[]) => [...factors].sort().join("*");
const factorsOf = (key: string) => (key === "" ? [] : key.split("*"));

function constant(v: number): Polynomial {
  return new Map([["", v]]);
}

function add(a: Polynomial, b: Polynomial, sign = 1): Polynomial {
  const r = new Map(a);
  for (const [k, v] of b) r.set(k, (r.get(k) ?? 0) + sign * v);
  return r;
}

function mul(a: Polynomial, b: Polynomial): Polynomial {
  const r: Polynomial = new Map();
  for (const [ka, va] of a)
    for (const [kb, vb] of b) {
      const k = keyOf([...factorsOf(ka), ...factorsOf(kb)]);
      r.set(k, (r.get(k) ?? 0) + va * vb);
    }
  return r;
}

/** The polynomial's value when it has no species terms, else null. */
export function constantValue(p: Polynomial): number | null {
  let v = 0;
  for (const [k, c] of p) {
    if (c === 0) continue;
    if (k !== "") return null;
    v += c;
  }
  return v;
}

export function cnValue(el: XmlElement): number {
  const type = el.attrs.type ?? "real";
  const parts = el.text.split(/\s+/).filter((s) => s !== "");
  const num = (s: string | undefined) => {
    const n = Number(s);
    if (s === undefined || !Number.isFinite(n)) throw new MathRefusal(`<cn> "${el.text}" is not a number`, el.line);
    return n;
  };
  if (type === "real" || type === "integer") {
    if (el.children.length > 0 || parts.length !== 1)
      throw new MathRefusal(`<cn> "${el.text}" is not a number`, el.line);
    return num(parts[0]);
  }
  if (type === "e-notation" || type === "rational") {
    // <cn type="e-notation"> a <sep/> b </cn>: the parser joins the two texts with a space.
    if (parts.length !== 2) throw new MathRefusal(`<cn type="${type}"> needs two numbers around <sep/>`, el.line);
    return type === "e-notation" ? num(parts[0]) * 10 ** num(parts[1]) : num(parts[0]) / num(parts[1]);
  }
  throw new MathRefusal(`<cn type="${type}"> is not supported`, el.line);
}

/** Reduces a MathML element to a polynomial; throws MathRefusal naming the construct and line. */
export function toPolynomial(el: XmlElement, resolve: (id: string, line: number) => SymbolValue): Polynomial {
  switch (el.name) {
    case "math": {
      if (el.children.length !== 1) throw new MathRefusal("<math> must hold exactly one expression", el.line);
      return toPolynomial(el.children[0], resolve);
    }
    case "cn":
      return constant(cnValue(el));
    case "ci": {
      const s = resolve(el.text, el.line);
      return s.kind === "constant" ? constant(s.value) : new Map([[s.id, s.scale]]);
    }
    case "csymbol": {
      const what = (el.attrs.definitionURL ?? "").split("/").pop() || el.text;
      throw new MathRefusal(
        `<csymbol> ${what} is not supported (Linger's fixed rate kinds do not depend on time or delays)`,
        el.line,
      );
    }
    case "apply": {
      const [head, ...args] = el.children;
      if (!head) throw new MathRefusal("<apply> without an operator", el.line);
      const polys = () => args.map((a) => toPolynomial(a, resolve));
      switch (head.name) {
        case "plus":
          return polys().reduce((a, b) => add(a, b), constant(0));
        case "times":
          return polys().reduce((a, b) => mul(a, b), constant(1));
        case "minus": {
          const p = polys();
          if (p.length === 1) return add(constant(0), p[0], -1);
          if (p.length === 2) return add(p[0], p[1], -1);
          throw new MathRefusal("<minus/> takes one or two arguments", head.line);
        }
        case "divide": {
          const p = polys();
          if (p.length !== 2) throw new MathRefusal("<divide/> takes two arguments", head.line);
          const d = constantValue(p[1]);
          if (d === null)
            throw new MathRefusal("division by a species amount is not one of Linger's rate kinds", head.line);
          if (d === 0) throw new MathRefusal("division by zero", head.line);
          return mul(p[0], constant(1 / d));
        }
        case "power": {
          const p = polys();
          if (p.length !== 2) throw new MathRefusal("<power/> takes two arguments", head.line);
          const e = constantValue(p[1]);
          const b = constantValue(p[0]);
          if (e !== null && b !== null) return constant(b ** e);
          if (e === null || !Number.isInteger(e) || e < 0 || e > 4)
            throw new MathRefusal("a species amount may only be raised to a whole power from 0 to 4", head.line);
          let r = constant(1);
          for (let i = 0; i < e; i++) r = mul(r, p[0]);
          return r;
        }
        default:
          throw new MathRefusal(`MathML <${head.name}/> is not supported by Linger's fixed rate kinds`, head.line);
      }
    }
    default:
      throw new MathRefusal(`MathML <${el.name}> is not supported`, el.line);
  }
}

/** True when two polynomials agree term by term within a relative tolerance. */
export function samePolynomial(a: Polynomial, b: Polynomial, rel = 1e-9): boolean {
  const keys = new Set([...a.keys(), ...b.keys()]);
  let scale = 0;
  for (const k of keys) scale = Math.max(scale, Math.abs(a.get(k) ?? 0), Math.abs(b.get(k) ?? 0));
  for (const k of keys) if (Math.abs((a.get(k) ?? 0) - (b.get(k) ?? 0)) > rel * scale) return false;
  return true;
}

export function polynomialFromTerms(terms: [string[], number][]): Polynomial {
  const r: Polynomial = new Map();
  for (const [f, c] of terms) {
    const k = keyOf(f);
    r.set(k, (r.get(k) ?? 0) + c);
  }
  return r;
}
