/**
 * Symbolic derivative of a checked rate expression (./expression.ts) with
 * respect to one species amount, as another checked tree, so the stiff ODE
 * solver's Jacobian (sim/ode/mean-field-jacobian.ts) is compiled from trees
 * only, the same safe way as the rates (treeFn in ./compile-model.ts).
 *
 * Rules (the usual calculus; Abramowitz & Stegun 1964, Handbook of
 * Mathematical Functions, 3.3 for the elementary derivatives):
 *   sum, difference, product and quotient rules; a^b with a constant exponent
 *   b a^(b-1) a', with a constant base a^b ln(a) b', otherwise
 *   a^b (b' ln a + b a'/a); exp, ln, log10, sqrt by the chain rule.
 * Where the function has a kink or a jump the derivative is one-sided and
 * documented here:
 *   abs(a): a' where a > 0, -a' where a < 0, 0 where a = 0;
 *   min(a, b): a' where a <= b, else b' (the first argument on a tie);
 *   max(a, b): a' where a >= b, else b'; more arguments nest the same way;
 *   floor, ceil: 0 (constant between their jumps);
 *   piecewise: the piecewise of the branches' derivatives under the same
 *   conditions (a condition's own jump contributes nothing).
 * Time, signals and parameters are constants here. Zeros and ones are folded
 * so a term that cannot depend on the species disappears.
 */
import { children, type ExprNode } from "./expression";

const ZERO: ExprNode = { t: "num", v: 0 };
const ONE: ExprNode = { t: "num", v: 1 };
const num = (v: number): ExprNode => ({ t: "num", v });
const isNum = (n: ExprNode, v: number) => n.t === "num" && n.v === v;

function add(a: ExprNode, b: ExprNode): ExprNode {
  if (isNum(a, 0)) return b;
  if (isNum(b, 0)) return a;
  if (a.t === "num" && b.t === "num") return num(a.v + b.v);
  return { t: "bin", op: "+", a, b };
}
function sub(a: ExprNode, b: ExprNode): ExprNode {
  if (isNum(b, 0)) return a;
  if (isNum(a, 0)) return neg(b);
  if (a.t === "num" && b.t === "num") return num(a.v - b.v);
  return { t: "bin", op: "-", a, b };
}
function mul(a: ExprNode, b: ExprNode): ExprNode {
  if (isNum(a, 0) || isNum(b, 0)) return ZERO;
  if (isNum(a, 1)) return b;
  if (isNum(b, 1)) return a;
  if (a.t === "num" && b.t === "num") return num(a.v * b.v);
  return { t: "bin", op: "*", a, b };
}
function div(a: ExprNode, b: ExprNode): ExprNode {
  if (isNum(a, 0)) return ZERO;
  if (isNum(b, 1)) return a;
  return { t: "bin", op: "/", a, b };
}
function neg(a: ExprNode): ExprNode {
  if (a.t === "num") return num(-a.v);
  if (a.t === "neg") return a.a;
  return { t: "neg", a };
}
const pow = (a: ExprNode, b: ExprNode): ExprNode => (isNum(b, 1) ? a : { t: "bin", op: "^", a, b });
const fn = (f: "exp" | "ln" | "sqrt", a: ExprNode): ExprNode => ({ t: "fn", f, args: [a] });

/** Whether the tree reads the species. */
export function readsSpecies(n: ExprNode, species: string): boolean {
  if (n.t === "name") return n.kind === "species" && n.name === species;
  return children(n).some((c) => readsSpecies(c, species));
}

/** d n / d species, as a checked tree (numbers, the tree's own names, the allowed functions). */
export function differentiate(n: ExprNode, species: string): ExprNode {
  if (!readsSpecies(n, species)) return ZERO;
  const d = (m: ExprNode) => differentiate(m, species);
  switch (n.t) {
    case "num":
    case "time":
      return ZERO;
    case "name":
      return n.kind === "species" && n.name === species ? ONE : ZERO;
    case "neg":
      return neg(d(n.a));
    case "bin": {
      const { a, b } = n;
      switch (n.op) {
        case "+":
          return add(d(a), d(b));
        case "-":
          return sub(d(a), d(b));
        case "*":
          return add(mul(d(a), b), mul(a, d(b)));
        case "/":
          // (a/b)' = a'/b - a b'/b^2
          return sub(div(d(a), b), div(mul(a, d(b)), mul(b, b)));
        case "^":
          return powDerivative(a, b, species);
      }
      break;
    }
    case "fn": {
      const [a, b] = n.args;
      switch (n.f) {
        case "exp":
          return mul(n, d(a));
        case "ln":
          return div(d(a), a);
        case "log10":
          return div(d(a), mul(a, num(Math.LN10)));
        case "sqrt":
          return div(d(a), mul(num(2), n));
        case "abs":
          return {
            t: "pw",
            pieces: [
              { v: d(a), c: { t: "cmp", op: ">", a, b: ZERO } },
              { v: neg(d(a)), c: { t: "cmp", op: "<", a, b: ZERO } },
            ],
            otherwise: ZERO,
          };
        case "pow":
          return powDerivative(a, b, species);
        case "min":
        case "max": {
          const first = n.args[0];
          const rest: ExprNode = n.args.length === 2 ? n.args[1] : { t: "fn", f: n.f, args: n.args.slice(1) };
          return {
            t: "pw",
            pieces: [{ v: d(first), c: { t: "cmp", op: n.f === "min" ? "<=" : ">=", a: first, b: rest } }],
            otherwise: d(rest),
          };
        }
        case "floor":
        case "ceil":
          return ZERO;
      }
      break;
    }
    case "pw":
      return {
        t: "pw",
        pieces: n.pieces.map((p) => ({ v: d(p.v), c: p.c })),
        otherwise: n.otherwise ? d(n.otherwise) : null,
      };
    case "cmp":
    case "and":
    case "or":
    case "not":
      // Conditions are not numbers; they only select branches (handled by "pw").
      return ZERO;
  }
  return ZERO;
}

function powDerivative(a: ExprNode, b: ExprNode, species: string): ExprNode {
  const da = differentiate(a, species);
  const db = differentiate(b, species);
  if (isNum(db, 0)) {
    // b a^(b-1) a'
    const bm1 = b.t === "num" ? num(b.v - 1) : sub(b, ONE);
    return mul(mul(b, isNum(bm1, 0) ? ONE : pow(a, bm1)), da);
  }
  const ab: ExprNode = { t: "bin", op: "^", a, b };
  if (isNum(da, 0)) return mul(mul(ab, fn("ln", a)), db);
  return mul(ab, add(mul(db, fn("ln", a)), div(mul(b, da), a)));
}
