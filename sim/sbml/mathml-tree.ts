/**
 * MathML content markup (as SBML Level 3 uses it) to and from Linger's
 * expression tree (sim/circuit/expression.ts), for kinetic laws that are not
 * one of the fixed kinds, event triggers and event assignments.
 *
 * Read: cn, ci, csymbol time, exponentiale, pi; apply of plus, minus, times,
 * divide, power, exp, ln, log (base 10 without <logbase>, as MathML defines),
 * root (square root without <degree>), abs, floor, ceiling, min, max, lt, leq,
 * gt, geq, eq, neq, and, or, not; piecewise with piece and otherwise.
 * Anything else is refused (MathRefusal with the element's line).
 */
import type { ExprNode } from "@/sim/circuit/expression";
import { cnValue, MathRefusal } from "./mathml";
import type { XmlElement } from "./xml";

export const SBML_TIME_URL = "http://www.sbml.org/sbml/symbols/time";

const CMP: Record<string, "<" | "<=" | ">" | ">=" | "==" | "!="> = {
  lt: "<",
  leq: "<=",
  gt: ">",
  geq: ">=",
  eq: "==",
  neq: "!=",
};
const UNARY: Record<string, "exp" | "ln" | "abs" | "floor" | "ceil"> = {
  exp: "exp",
  ln: "ln",
  abs: "abs",
  floor: "floor",
  ceiling: "ceil",
};

/** Converts a MathML element; `resolve` maps a <ci> id to a tree (a number, a name, amount/size...). */
export function mathmlToTree(el: XmlElement, resolve: (id: string, line: number) => ExprNode): ExprNode {
  const rec = (e: XmlElement) => mathmlToTree(e, resolve);
  switch (el.name) {
    case "math":
      if (el.children.length !== 1) throw new MathRefusal("<math> must hold exactly one expression", el.line);
      return rec(el.children[0]);
    case "cn":
      return { t: "num", v: cnValue(el) };
    case "ci":
      return resolve(el.text, el.line);
    case "csymbol": {
      const url = el.attrs.definitionURL ?? "";
      if (url === SBML_TIME_URL) return { t: "time" };
      throw new MathRefusal(`<csymbol> ${url.split("/").pop() || el.text} is not supported (only time)`, el.line);
    }
    case "exponentiale":
      return { t: "num", v: Math.E };
    case "pi":
      return { t: "num", v: Math.PI };
    case "piecewise": {
      const pieces: { v: ExprNode; c: ExprNode }[] = [];
      let otherwise: ExprNode | null = null;
      for (const c of el.children) {
        if (c.name === "piece") {
          if (c.children.length !== 2) throw new MathRefusal("<piece> needs a value and a condition", c.line);
          pieces.push({ v: rec(c.children[0]), c: rec(c.children[1]) });
        } else if (c.name === "otherwise") {
          if (c.children.length !== 1) throw new MathRefusal("<otherwise> needs one value", c.line);
          otherwise = rec(c.children[0]);
        } else throw new MathRefusal(`<${c.name}> is not expected in <piecewise>`, c.line);
      }
      if (pieces.length === 0) throw new MathRefusal("<piecewise> without a <piece>", el.line);
      return { t: "pw", pieces, otherwise };
    }
    case "apply": {
      const [head, ...rest] = el.children;
      if (!head) throw new MathRefusal("<apply> without an operator", el.line);
      const quals = rest.filter((c) => c.name === "logbase" || c.name === "degree");
      const args = rest.filter((c) => c.name !== "logbase" && c.name !== "degree").map(rec);
      const need = (n: number) => {
        if (args.length !== n)
          throw new MathRefusal(
            `<${head.name}/> takes ${n} argument${n === 1 ? "" : "s"}, not ${args.length}`,
            head.line,
          );
      };
      const chain = (op: "+" | "*", unit: number): ExprNode =>
        args.length === 0 ? { t: "num", v: unit } : args.reduce((a, b) => ({ t: "bin", op, a, b }));
      const qual = (name: string): ExprNode | null => {
        const q = quals.find((c) => c.name === name);
        if (!q) return null;
        if (q.children.length !== 1) throw new MathRefusal(`<${name}> needs one value`, q.line);
        return rec(q.children[0]);
      };
      switch (head.name) {
        case "plus":
          return chain("+", 0);
        case "times":
          return chain("*", 1);
        case "minus":
          if (args.length === 1) return { t: "neg", a: args[0] };
          need(2);
          return { t: "bin", op: "-", a: args[0], b: args[1] };
        case "divide":
          need(2);
          return { t: "bin", op: "/", a: args[0], b: args[1] };
        case "power":
          need(2);
          return { t: "bin", op: "^", a: args[0], b: args[1] };
        case "log": {
          need(1);
          const base = qual("logbase");
          if (base === null || (base.t === "num" && base.v === 10)) return { t: "fn", f: "log10", args };
          return { t: "bin", op: "/", a: { t: "fn", f: "ln", args }, b: { t: "fn", f: "ln", args: [base] } };
        }
        case "root": {
          need(1);
          const degree = qual("degree");
          if (degree === null || (degree.t === "num" && degree.v === 2)) return { t: "fn", f: "sqrt", args };
          return { t: "fn", f: "pow", args: [args[0], { t: "bin", op: "/", a: { t: "num", v: 1 }, b: degree }] };
        }
        case "min":
        case "max":
          if (args.length === 1) return args[0];
          if (args.length < 1) throw new MathRefusal(`<${head.name}/> needs an argument`, head.line);
          return { t: "fn", f: head.name, args };
        case "and":
        case "or":
          if (args.length < 1) throw new MathRefusal(`<${head.name}/> needs an argument`, head.line);
          return args.length === 1 ? args[0] : { t: head.name, args };
        case "not":
          need(1);
          return { t: "not", a: args[0] };
        default:
          if (head.name in UNARY) {
            need(1);
            return { t: "fn", f: UNARY[head.name], args };
          }
          if (head.name in CMP) {
            need(2);
            return { t: "cmp", op: CMP[head.name], a: args[0], b: args[1] };
          }
          throw new MathRefusal(`MathML <${head.name}/> is not supported in Linger expressions`, head.line);
      }
    }
    default:
      throw new MathRefusal(`MathML <${el.name}> is not supported`, el.line);
  }
}

const CMP_TAG: Record<string, string> = { "<": "lt", "<=": "leq", ">": "gt", ">=": "geq", "==": "eq", "!=": "neq" };
const BIN_TAG: Record<string, string> = { "+": "plus", "-": "minus", "*": "times", "/": "divide", "^": "power" };

/** MathML of a tree (content markup, without the <math> wrapper); names become <ci> as they are. */
export function treeToMathml(n: ExprNode): string {
  const m = treeToMathml;
  const apply = (op: string, ...args: string[]) => `<apply><${op}/>${args.join("")}</apply>`;
  switch (n.t) {
    case "num":
      return `<cn>${n.v}</cn>`;
    case "name":
      return `<ci>${n.name}</ci>`;
    case "time":
      return `<csymbol encoding="text" definitionURL="${SBML_TIME_URL}">time</csymbol>`;
    case "bin":
      return apply(BIN_TAG[n.op], m(n.a), m(n.b));
    case "neg":
      return apply("minus", m(n.a));
    case "fn":
      switch (n.f) {
        case "log10":
          return `<apply><log/><logbase><cn>10</cn></logbase>${m(n.args[0])}</apply>`;
        case "sqrt":
          return apply("root", m(n.args[0]));
        case "pow":
          return apply("power", m(n.args[0]), m(n.args[1]));
        case "ceil":
          return apply("ceiling", m(n.args[0]));
        default:
          return apply(n.f, ...n.args.map(m));
      }
    case "cmp":
      return apply(CMP_TAG[n.op], m(n.a), m(n.b));
    case "and":
    case "or":
      return apply(n.t, ...n.args.map(m));
    case "not":
      return apply("not", m(n.a));
    case "pw":
      return `<piecewise>${n.pieces.map((p) => `<piece>${m(p.v)}${m(p.c)}</piece>`).join("")}${n.otherwise ? `<otherwise>${m(n.otherwise)}</otherwise>` : ""}</piecewise>`;
  }
}
