/**
 * Rate expressions: parsing, checking and code generation.
 *
 * Text is parsed with mathjs's parser (`parse`, never evaluated by mathjs) and
 * the parse tree is converted into Linger's own small tree (ExprNode), keeping
 * only what rate expressions allow:
 *   numbers, names (species amounts, signals, parameters, `time`),
 *   + - * / ^, unary minus, parentheses,
 *   exp ln log (natural) log10 sqrt abs pow min max floor ceil,
 *   piecewise(value1, condition1, value2, condition2, ..., otherwise),
 *   conditions with < <= > >= == != and and/or/not.
 * Anything else (assignments, matrices, strings, units, other functions,
 * implicit multiplication such as `2x`) is refused with the position of the
 * offending text.
 *
 * Time may appear only as one side of a comparison with a constant, inside a
 * piecewise condition: the value of such an expression is constant between the
 * comparison constants (its "clock stops"), so the direct method stays exact
 * when the clock stops there, as at an input switch. Any other use of time is
 * refused.
 *
 * Generated code is built from the checked tree only: numbers are printed from
 * finite JavaScript numbers, names become slot variables chosen by the caller,
 * functions map to a fixed table of Math functions. No user text reaches it.
 */
import { parse, type MathNode } from "mathjs";

export type NumFn = "exp" | "ln" | "log10" | "sqrt" | "abs" | "pow" | "min" | "max" | "floor" | "ceil";
export type CmpOp = "<" | "<=" | ">" | ">=" | "==" | "!=";

/** A checked expression tree; names are already resolved to their kind. */
export type ExprNode =
  | { t: "num"; v: number }
  | { t: "name"; kind: "species" | "signal" | "param"; name: string }
  | { t: "time" }
  | { t: "bin"; op: "+" | "-" | "*" | "/" | "^"; a: ExprNode; b: ExprNode }
  | { t: "neg"; a: ExprNode }
  | { t: "fn"; f: NumFn; args: ExprNode[] }
  | { t: "cmp"; op: CmpOp; a: ExprNode; b: ExprNode }
  | { t: "and" | "or"; args: ExprNode[] }
  | { t: "not"; a: ExprNode }
  | { t: "pw"; pieces: { v: ExprNode; c: ExprNode }[]; otherwise: ExprNode | null };

export interface ExprScope {
  species: ReadonlySet<string>;
  signals: ReadonlySet<string>;
  params: ReadonlySet<string>;
  /** Whether `time` may appear (in piecewise conditions compared with a constant). Default true. */
  allowTime?: boolean;
}

export interface ExprError {
  /** 1-based character position in the text, when known. */
  position: number | null;
  message: string;
}

export type ParseResult = { ok: true; tree: ExprNode } | { ok: false; error: ExprError };

export const EXPRESSION_MAX_LENGTH = 2000;

const FN_ARITY: Record<string, [NumFn, number, number]> = {
  exp: ["exp", 1, 1],
  ln: ["ln", 1, 1],
  log: ["ln", 1, 1],
  log10: ["log10", 1, 1],
  sqrt: ["sqrt", 1, 1],
  abs: ["abs", 1, 1],
  pow: ["pow", 2, 2],
  min: ["min", 2, 16],
  max: ["max", 2, 16],
  floor: ["floor", 1, 1],
  ceil: ["ceil", 1, 1],
};

const OPS: Record<string, "+" | "-" | "*" | "/" | "^"> = {
  add: "+",
  subtract: "-",
  multiply: "*",
  divide: "/",
  pow: "^",
};
const CMPS: Record<string, CmpOp> = {
  smaller: "<",
  smallerEq: "<=",
  larger: ">",
  largerEq: ">=",
  equal: "==",
  unequal: "!=",
};

class Refusal extends Error {
  constructor(
    message: string,
    readonly needle: string | null,
  ) {
    super(message);
  }
}

/** 1-based position of the first whole-word occurrence of needle (or of the text) in source. */
function locate(source: string, needle: string | null): number | null {
  if (!needle) return null;
  const word = /^[A-Za-z_]\w*$/.test(needle);
  const esc = needle.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
  const m = new RegExp(word ? `(?<![\\w.])${esc}(?!\\w)` : esc).exec(source);
  return m ? m.index + 1 : null;
}

type Kind = "num" | "bool";

function kindOf(n: ExprNode): Kind {
  return n.t === "cmp" || n.t === "and" || n.t === "or" || n.t === "not" ? "bool" : "num";
}

/** Folds a tree without names or time to its number, or null. */
export function constantValue(n: ExprNode): number | null {
  if (n.t === "num") return n.v;
  if (n.t === "name" || n.t === "time") return null;
  if (kindOf(n) !== "num") return null;
  const names = new Set<string>();
  collectNames(n, names);
  if (names.size > 0 || usesTime(n)) return null;
  const v = evaluateTree(n, () => 0, 0);
  return typeof v === "number" ? v : null;
}

function collectNames(n: ExprNode, out: Set<string>): void {
  if (n.t === "name") out.add(`${n.kind}:${n.name}`);
  for (const c of children(n)) collectNames(c, out);
}

export function children(n: ExprNode): ExprNode[] {
  switch (n.t) {
    case "num":
    case "name":
    case "time":
      return [];
    case "bin":
    case "cmp":
      return [n.a, n.b];
    case "neg":
    case "not":
      return [n.a];
    case "fn":
    case "and":
    case "or":
      return n.args;
    case "pw":
      return [...n.pieces.flatMap((p) => [p.v, p.c]), ...(n.otherwise ? [n.otherwise] : [])];
  }
}

export function usesTime(n: ExprNode): boolean {
  return n.t === "time" || children(n).some(usesTime);
}

/** Names read by a tree, by kind. */
export function namesRead(n: ExprNode): { species: Set<string>; signals: Set<string>; params: Set<string> } {
  const out = { species: new Set<string>(), signals: new Set<string>(), params: new Set<string>() };
  const walk = (m: ExprNode) => {
    if (m.t === "name")
      (m.kind === "species" ? out.species : m.kind === "signal" ? out.signals : out.params).add(m.name);
    children(m).forEach(walk);
  };
  walk(n);
  return out;
}

function convert(node: MathNode, scope: ExprScope): ExprNode {
  const n = node as MathNode & Record<string, any>;
  switch (n.type) {
    case "ParenthesisNode":
      return convert(n.content, scope);
    case "ConstantNode": {
      if (typeof n.value !== "number" || !Number.isFinite(n.value))
        throw new Refusal(`only numbers are allowed as constants, not ${JSON.stringify(n.value)}`, String(n.value));
      return { t: "num", v: n.value };
    }
    case "SymbolNode": {
      const name: string = n.name;
      const hits = [
        scope.species.has(name) ? "species" : null,
        scope.signals.has(name) ? "signal" : null,
        scope.params.has(name) ? "param" : null,
      ].filter((k): k is "species" | "signal" | "param" => k !== null);
      if (name === "time") {
        if (hits.length > 0) throw new Refusal(`"time" is the clock here; rename the ${hits[0]} called time`, name);
        if (scope.allowTime === false)
          throw new Refusal("time is not allowed here (an event value may read species, signals and parameters)", name);
        return { t: "time" };
      }
      if (hits.length === 0) {
        if (name in FN_ARITY || name === "piecewise")
          throw new Refusal(`${name} is a function: write ${name}(...)`, name);
        throw new Refusal(`"${name}" is not a species, signal or parameter of the circuit`, name);
      }
      if (hits.length > 1) throw new Refusal(`"${name}" is ambiguous (both a ${hits[0]} and a ${hits[1]})`, name);
      return { t: "name", kind: hits[0], name };
    }
    case "OperatorNode": {
      const fn: string = n.fn;
      const args: MathNode[] = n.args;
      if (n.implicit)
        throw new Refusal(`write the multiplication with * (implicit multiplication is not allowed)`, null);
      if (fn === "unaryMinus") return { t: "neg", a: convert(args[0], scope) };
      if (fn === "unaryPlus") return convert(args[0], scope);
      if (fn in OPS) return { t: "bin", op: OPS[fn], a: convert(args[0], scope), b: convert(args[1], scope) };
      if (fn in CMPS) return { t: "cmp", op: CMPS[fn], a: convert(args[0], scope), b: convert(args[1], scope) };
      if (fn === "and" || fn === "or") {
        // flatten chains a and b and c
        const out: ExprNode[] = [];
        for (const a of args) {
          const c = convert(a, scope);
          if (c.t === fn) out.push(...c.args);
          else out.push(c);
        }
        return { t: fn, args: out };
      }
      if (fn === "not") return { t: "not", a: convert(args[0], scope) };
      throw new Refusal(`operator ${n.op} is not allowed`, n.op);
    }
    case "FunctionNode": {
      const fname: string | undefined = n.fn?.type === "SymbolNode" ? n.fn.name : undefined;
      const args: MathNode[] = n.args;
      if (fname === "piecewise") {
        if (args.length < 3 || args.length % 2 === 0)
          throw new Refusal(
            "piecewise needs value, condition pairs and a final otherwise value: piecewise(v1, c1, ..., otherwise)",
            "piecewise",
          );
        const pieces: { v: ExprNode; c: ExprNode }[] = [];
        for (let i = 0; i + 1 < args.length; i += 2)
          pieces.push({ v: convert(args[i], scope), c: convert(args[i + 1], scope) });
        return { t: "pw", pieces, otherwise: convert(args[args.length - 1], scope) };
      }
      if (fname === undefined || !(fname in FN_ARITY))
        throw new Refusal(
          `unknown function ${fname ?? "(expression)"}; allowed: ${Object.keys(FN_ARITY).join(", ")}, piecewise`,
          fname ?? null,
        );
      const [f, lo, hi] = FN_ARITY[fname];
      if (args.length < lo || args.length > hi)
        throw new Refusal(
          `${fname} takes ${lo === hi ? lo : `${lo} to ${hi}`} argument${hi === 1 ? "" : "s"}, not ${args.length}`,
          fname,
        );
      return { t: "fn", f, args: args.map((a) => convert(a, scope)) };
    }
    case "ConditionalNode":
      return {
        t: "pw",
        pieces: [{ v: convert(n.trueExpr, scope), c: convert(n.condition, scope) }],
        otherwise: convert(n.falseExpr, scope),
      };
    default:
      throw new Refusal(`${describeNode(n.type)} is not allowed in a rate expression`, null);
  }
}

function describeNode(type: string): string {
  const names: Record<string, string> = {
    AssignmentNode: "an assignment",
    FunctionAssignmentNode: "a function definition",
    ArrayNode: "a matrix or list",
    IndexNode: "indexing",
    AccessorNode: "indexing",
    ObjectNode: "an object",
    RangeNode: "a range",
    BlockNode: "more than one statement",
    RelationalNode: "a chained comparison (write a < b and b < c)",
  };
  return names[type] ?? `a ${type}`;
}

/** Type checks (numbers vs conditions), time placement and constant domains. */
function check(n: ExprNode, want: Kind, inCondition: boolean): void {
  const k = kindOf(n);
  if (k !== want)
    throw new Refusal(
      want === "num"
        ? "a condition (comparison or and/or/not) is used where a number is needed; conditions belong in piecewise"
        : "a number is used where a condition is needed (write a comparison such as X > 10)",
      null,
    );
  switch (n.t) {
    case "num":
    case "name":
      return;
    case "time":
      throw new Refusal(
        "time may appear only in a piecewise condition, compared with a constant (for example piecewise(1, time < 30, 0))",
        "time",
      );
    case "bin":
      check(n.a, "num", false);
      check(n.b, "num", false);
      if (n.op === "/" && constantValue(n.b) === 0) throw new Refusal("division by zero", "/");
      return;
    case "neg":
      return check(n.a, "num", false);
    case "fn": {
      n.args.forEach((a) => check(a, "num", false));
      const c = n.args.length === 1 ? constantValue(n.args[0]) : null;
      if (c !== null && (n.f === "ln" || n.f === "log10") && !(c > 0))
        throw new Refusal(`${n.f === "ln" ? "ln" : "log10"} of ${c}: the argument must be positive`, n.f);
      if (c !== null && n.f === "sqrt" && c < 0)
        throw new Refusal(`sqrt of ${c}: the argument must not be negative`, "sqrt");
      return;
    }
    case "cmp": {
      const ta = n.a.t === "time";
      const tb = n.b.t === "time";
      if ((ta || tb) && inCondition) {
        const other = ta ? n.b : n.a;
        if (other.t === "time" || constantValue(other) === null)
          throw new Refusal("time must be compared with a constant number (for example time >= 30)", "time");
        return;
      }
      check(n.a, "num", false);
      check(n.b, "num", false);
      return;
    }
    case "and":
    case "or":
      return n.args.forEach((a) => check(a, "bool", inCondition));
    case "not":
      return check(n.a, "bool", inCondition);
    case "pw":
      for (const p of n.pieces) {
        check(p.v, "num", false);
        check(p.c, "bool", true);
      }
      if (n.otherwise) check(n.otherwise, "num", false);
      return;
  }
}

/** Parses and checks a rate expression (or, with want = "bool", a condition). */
export function parseExpression(text: string, scope: ExprScope, want: "num" | "bool" = "num"): ParseResult {
  if (text.trim() === "") return { ok: false, error: { position: 1, message: "the expression is empty" } };
  if (text.length > EXPRESSION_MAX_LENGTH)
    return { ok: false, error: { position: null, message: `at most ${EXPRESSION_MAX_LENGTH} characters` } };
  let node: MathNode;
  try {
    node = parse(text);
  } catch (e) {
    const msg = (e as Error).message;
    const m = /\(char (\d+)\)/.exec(msg);
    return {
      ok: false,
      error: { position: m ? Number(m[1]) : null, message: msg.replace(/\s*\(char \d+\)/, "").trim() },
    };
  }
  try {
    const tree = convert(node, scope);
    check(tree, want, want === "bool");
    return { ok: true, tree };
  } catch (e) {
    if (e instanceof Refusal) return { ok: false, error: { position: locate(text, e.needle), message: e.message } };
    throw e;
  }
}

/** "at position 7: ..." or the message alone. */
export function describeExprError(e: ExprError): string {
  return e.position !== null ? `at position ${e.position}: ${e.message}` : e.message;
}

/** The constants time is compared with (the clock stops of this tree). */
export function timeStops(n: ExprNode, out: Set<number> = new Set()): Set<number> {
  if (n.t === "cmp" && (n.a.t === "time" || n.b.t === "time")) {
    const c = constantValue(n.a.t === "time" ? n.b : n.a);
    if (c !== null) out.add(c);
  }
  for (const c of children(n)) timeStops(c, out);
  return out;
}

/** How the generated code names the tree's leaves. */
export interface CodeNames {
  name(kind: "species" | "signal" | "param", name: string): string;
  time: string;
}

function num(v: number): string {
  if (!Number.isFinite(v)) throw new Error("internal: non-finite constant");
  const s = String(v);
  return v < 0 || Object.is(v, -0) ? `(${s})` : s;
}

const JS_FN: Record<NumFn, string> = {
  exp: "Math.exp",
  ln: "Math.log",
  log10: "Math.log10",
  sqrt: "Math.sqrt",
  abs: "Math.abs",
  pow: "Math.pow",
  min: "Math.min",
  max: "Math.max",
  floor: "Math.floor",
  ceil: "Math.ceil",
};

/** JavaScript source of a checked tree (numbers, caller's variable names and Math functions only). */
export function treeToJs(n: ExprNode, names: CodeNames): string {
  const js = (m: ExprNode) => treeToJs(m, names);
  switch (n.t) {
    case "num":
      return num(n.v);
    case "name":
      return names.name(n.kind, n.name);
    case "time":
      return names.time;
    case "bin":
      return n.op === "^" ? `Math.pow(${js(n.a)}, ${js(n.b)})` : `(${js(n.a)} ${n.op} ${js(n.b)})`;
    case "neg":
      return `(-${js(n.a)})`;
    case "fn":
      return `${JS_FN[n.f]}(${n.args.map(js).join(", ")})`;
    case "cmp":
      return `(${js(n.a)} ${n.op === "==" ? "===" : n.op === "!=" ? "!==" : n.op} ${js(n.b)})`;
    case "and":
      return `(${n.args.map(js).join(" && ")})`;
    case "or":
      return `(${n.args.map(js).join(" || ")})`;
    case "not":
      return `(!${js(n.a)})`;
    case "pw": {
      let out = n.otherwise ? js(n.otherwise) : "NaN";
      for (let i = n.pieces.length - 1; i >= 0; i--) out = `(${js(n.pieces[i].c)} ? ${js(n.pieces[i].v)} : ${out})`;
      return out;
    }
  }
}

/** Direct evaluation (for constant folding and tests); names are looked up by `value`. */
export function evaluateTree(
  n: ExprNode,
  value: (kind: "species" | "signal" | "param", name: string) => number,
  time: number,
): number | boolean {
  const ev = (m: ExprNode) => evaluateTree(m, value, time) as number;
  const evb = (m: ExprNode) => evaluateTree(m, value, time) as boolean;
  switch (n.t) {
    case "num":
      return n.v;
    case "name":
      return value(n.kind, n.name);
    case "time":
      return time;
    case "bin": {
      const a = ev(n.a);
      const b = ev(n.b);
      return n.op === "+" ? a + b : n.op === "-" ? a - b : n.op === "*" ? a * b : n.op === "/" ? a / b : Math.pow(a, b);
    }
    case "neg":
      return -ev(n.a);
    case "fn": {
      const a = n.args.map(ev);
      const f = n.f === "ln" ? Math.log : Math[n.f];
      return (f as (...x: number[]) => number)(...a);
    }
    case "cmp": {
      const a = ev(n.a);
      const b = ev(n.b);
      switch (n.op) {
        case "<":
          return a < b;
        case "<=":
          return a <= b;
        case ">":
          return a > b;
        case ">=":
          return a >= b;
        case "==":
          return a === b;
        case "!=":
          return a !== b;
      }
      return false;
    }
    case "and":
      return n.args.every(evb);
    case "or":
      return n.args.some(evb);
    case "not":
      return !evb(n.a);
    case "pw": {
      for (const p of n.pieces) if (evb(p.c)) return ev(p.v);
      return n.otherwise ? ev(n.otherwise) : NaN;
    }
  }
}

/** Linger's own text form of a tree (used by the SBML importer and for display). */
export function treeToText(n: ExprNode): string {
  const t = treeToText;
  switch (n.t) {
    case "num":
      return n.v < 0 ? `(${n.v})` : String(n.v);
    case "name":
      return n.name;
    case "time":
      return "time";
    case "bin":
      return `(${t(n.a)} ${n.op} ${t(n.b)})`;
    case "neg":
      return `(-${t(n.a)})`;
    case "fn":
      return `${n.f}(${n.args.map(t).join(", ")})`;
    case "cmp":
      return `(${t(n.a)} ${n.op} ${t(n.b)})`;
    case "and":
    case "or":
      return `(${n.args.map(t).join(` ${n.t} `)})`;
    case "not":
      return `(not ${t(n.a)})`;
    case "pw":
      return `piecewise(${[...n.pieces.flatMap((p) => [t(p.v), t(p.c)]), n.otherwise ? t(n.otherwise) : "0"].join(", ")})`;
  }
}
