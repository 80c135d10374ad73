/**
 * The circuit form: species, signals, reactions with their rate laws, the
 * output. Numbers are typed as text and checked with the shared CircuitSchema
 * as the user types, then with the engine's own checks in plain words
 * (components/forms/circuit-problems.ts): messages appear beside their field
 * once it was touched, or all at once on save. Server field errors (paths like
 * "body.reactions.0...") are shown in the same places, without developer
 * prefixes. What was typed is kept when the server says no. Renaming a species
 * or signal renames every reference to it.
 */
import React, { useMemo, useState } from "react";
import { View } from "react-native";
import { CircuitSchema, type CircuitInput } from "@/shared/schemas/circuit";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Banner } from "@/components/ui/states";
import { issuesToMap, parseNumber } from "./zod-errors";
import { formatStoich, parseStoich } from "./stoich-text";
import { circuitProblems, defaultRegulatorSource, renameReferences, stripDeveloperPrefix } from "./circuit-problems";

type Path = (string | number)[];

function setIn<T>(obj: T, path: Path, value: unknown): T {
  const root = structuredClone(obj) as Record<string | number, unknown>;
  let cur = root as Record<string | number, unknown>;
  for (let i = 0; i < path.length - 1; i++) {
    const k = path[i];
    if (cur[k] === undefined || cur[k] === null) cur[k] = typeof path[i + 1] === "number" ? [] : {};
    cur = cur[k] as Record<string | number, unknown>;
  }
  const last = path[path.length - 1];
  if (value === undefined) delete cur[last];
  else cur[last] = value;
  return root as T;
}

function getIn(obj: unknown, path: Path): unknown {
  let cur = obj as Record<string | number, unknown> | undefined;
  for (const k of path) cur = cur?.[k] as Record<string | number, unknown> | undefined;
  return cur;
}

const key = (p: Path) => p.join(".");

export type CircuitEditorProps = {
  initial: CircuitInput;
  onSubmit: (body: CircuitInput) => void;
  submitLabel: string;
  busy?: boolean;
  /** Field errors from the server, keyed by path inside the body ("species.0.name"). */
  serverErrors?: Record<string, string>;
  serverMessage?: string;
  /** Shown above the form, e.g. the live feed-forward type. */
  header?: React.ReactNode;
  onChange?: (body: CircuitInput) => void;
};

export function CircuitEditor({
  initial,
  onSubmit,
  submitLabel,
  busy,
  serverErrors = {},
  serverMessage,
  header,
  onChange,
}: CircuitEditorProps) {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const [circuit, setCircuit] = useState<CircuitInput>(initial);
  const [texts, setTexts] = useState<Record<string, string>>({});
  const [touched, setTouched] = useState<Set<string>>(new Set());
  const [showAll, setShowAll] = useState(false);
  /** Per species/signal row: the name its references use while the field is being retyped (or emptied). */
  const [refNames, setRefNames] = useState<Record<string, string>>({});

  const parsed = useMemo(() => CircuitSchema.safeParse(circuit), [circuit]);
  const clientErrors = useMemo(
    () => (parsed.success ? circuitProblems(parsed.data) : issuesToMap(parsed.error.issues)),
    [parsed],
  );

  const species = circuit.species ?? [];
  const signals = circuit.signals ?? [];
  const reactions = circuit.reactions ?? [];
  const commit = (next: CircuitInput, touchedKey: string) => {
    setCircuit(next);
    setTouched((s) => new Set(s).add(touchedKey));
    onChange?.(next);
  };
  const update = (path: Path, value: unknown) => commit(setIn(circuit, path, value), key(path));
  /** A species or signal renamed: every reaction (and the output) that used the old name follows. */
  const rename = (what: "species" | "signal", i: number, value: string) => {
    const list = what === "species" ? species : signals;
    const rowKey = `${what}.${i}`;
    const from = refNames[rowKey] ?? list[i]?.name ?? "";
    let next = setIn(circuit, [what === "species" ? "species" : "signals", i, "name"], value);
    if (value) next = renameReferences(next, what, from, value);
    setRefNames((m) => ({ ...m, [rowKey]: value || from }));
    // Stoichiometry texts typed earlier would show the old name: show the renamed lists instead.
    setTexts((m) => Object.fromEntries(Object.entries(m).filter(([k]) => !/\.(reactants|products)$/.test(k))));
    commit(next, key([what === "species" ? "species" : "signals", i, "name"]));
  };
  /** The message at key k, once the field (touchedKey) was touched or on save; a server message until then. */
  const shown = (k: string, touchedKey = k): string | undefined => {
    if (serverErrors[k] && !touched.has(touchedKey)) return clientErrors[k] ?? stripDeveloperPrefix(serverErrors[k]);
    if (showAll || touched.has(touchedKey)) return clientErrors[k];
    return undefined;
  };
  const errorAt = (path: Path): string | undefined => shown(key(path));
  /** The first message for a field or anything under it (a stoichiometry list and its entries). */
  const errorUnder = (path: Path): string | undefined => {
    const k = key(path);
    const keys = [
      k,
      ...[...Object.keys(clientErrors), ...Object.keys(serverErrors)].filter((x) => x.startsWith(k + ".")),
    ];
    for (const x of keys) {
      const m = shown(x, k);
      if (m) return m;
    }
    return undefined;
  };
  const textField = (label: string, path: Path, extra: Partial<React.ComponentProps<typeof Field>> = {}) => (
    <Field
      label={label}
      value={String(getIn(circuit, path) ?? "")}
      onChangeText={(v) => update(path, v)}
      error={errorAt(path)}
      autoCapitalize="none"
      testID={`circuit-${key(path)}`}
      {...extra}
    />
  );
  /** inRow: beside other fields in a row (grows to share it); else alone in the column (no flex basis, no gap). */
  const numberField = (label: string, path: Path, unit?: string, optional = false, inRow = true) => {
    const k = key(path);
    const value = getIn(circuit, path);
    return (
      <Field
        label={label}
        unit={unit}
        keyboardType="decimal-pad"
        value={texts[k] ?? (value === undefined || value === null || Number.isNaN(value) ? "" : String(value))}
        onChangeText={(v) => {
          setTexts((s) => ({ ...s, [k]: v }));
          update(path, optional && v.trim() === "" ? undefined : parseNumber(v));
        }}
        error={errorAt(path)}
        testID={`circuit-${k}`}
        style={isWide && inRow ? { flexGrow: 1, flexBasis: 140 } : undefined}
      />
    );
  };
  // Stacked on a phone: a flexBasis would become a height there and leave blank gaps.
  const grow = (basis: number) => (isWide ? { flexGrow: 1, flexBasis: basis } : undefined);
  const row = (children: React.ReactNode) => (
    <View style={{ flexDirection: isWide ? "row" : "column", gap: t.spacing.md, flexWrap: "wrap" }}>{children}</View>
  );

  const submit = () => {
    setShowAll(true);
    if (parsed.success && Object.keys(clientErrors).length === 0) onSubmit(circuit);
  };
  const errorCount = Object.keys(clientErrors).length;

  return (
    <View style={{ gap: t.spacing.lg }}>
      {serverMessage ? (
        <Banner tone="danger" testID="circuit-server-error">
          {serverMessage}
        </Banner>
      ) : null}
      {header}
      <Card>
        <Text variant="heading">About</Text>
        {textField("Circuit name", ["name"], { autoCapitalize: "sentences" })}
        {textField("Description", ["description"], { multiline: true, autoCapitalize: "sentences" })}
        <Choice
          label="Output species (the reporter the figures are about)"
          value={circuit.outputSpecies ?? ""}
          options={species.filter((s) => s.name).map((s) => ({ value: s.name, label: s.name }))}
          onChange={(v) => update(["outputSpecies"], v)}
        />
        {errorAt(["outputSpecies"]) ? (
          <Text variant="caption" tone="danger" role="alert">
            {errorAt(["outputSpecies"])}
          </Text>
        ) : null}
      </Card>

      <Card>
        <Text variant="heading">Species</Text>
        {species.map((s, i) => (
          <View
            key={i}
            style={{
              gap: t.spacing.sm,
              borderTopWidth: i ? 1 : 0,
              borderTopColor: t.colors.divider,
              paddingTop: i ? t.spacing.md : 0,
            }}
          >
            {row(
              <>
                <View style={grow(160)}>
                  {textField(`Species ${i + 1} name`, ["species", i, "name"], {
                    onChangeText: (v) => rename("species", i, v),
                  })}
                </View>
                {numberField(
                  `Initial count of ${s.name || `species ${i + 1}`}`,
                  ["species", i, "initialCount"],
                  "molecules",
                )}
              </>,
            )}
            <Button
              label={`Remove species ${s.name || i + 1}`}
              variant="ghost"
              compact
              icon="trash-2"
              style={{ alignSelf: "flex-start" }}
              onPress={() => {
                setRefNames({});
                update(
                  ["species"],
                  species.filter((_, j) => j !== i),
                );
              }}
            />
          </View>
        ))}
        <Button
          label="Add species"
          variant="secondary"
          icon="plus"
          style={{ alignSelf: "flex-start" }}
          onPress={() => update(["species", species.length], { name: "", initialCount: 0 })}
        />
      </Card>

      <Card>
        <Text variant="heading">Input signals</Text>
        <Text variant="caption" tone="muted">
          Signals are set by an input program (for example an inducer added to the tank).
        </Text>
        {signals.map((s, i) => (
          <View key={i} style={{ gap: t.spacing.sm }}>
            {row(
              <>
                <View style={grow(160)}>
                  {textField(`Signal ${i + 1} name`, ["signals", i, "name"], {
                    onChangeText: (v) => rename("signal", i, v),
                  })}
                </View>
                {numberField("Level when off", ["signals", i, "offLevel"], "signal units")}
                {numberField("Level when on", ["signals", i, "onLevel"], "signal units")}
              </>,
            )}
            <Button
              label={`Remove signal ${s.name || i + 1}`}
              variant="ghost"
              compact
              icon="trash-2"
              style={{ alignSelf: "flex-start" }}
              onPress={() => {
                setRefNames({});
                update(
                  ["signals"],
                  signals.filter((_, j) => j !== i),
                );
              }}
            />
          </View>
        ))}
        <Button
          label="Add signal"
          variant="secondary"
          icon="plus"
          style={{ alignSelf: "flex-start" }}
          onPress={() => update(["signals", signals.length], { name: "", offLevel: 0, onLevel: 1 })}
        />
      </Card>

      <Card>
        <Text variant="heading">Reactions</Text>
        {reactions.map((r, i) => {
          const kind = r.rate?.kind ?? "massAction";
          const regs = r.rate?.kind === "regulated" ? (r.rate.regulators ?? []) : [];
          return (
            <View
              key={i}
              testID={`reaction-${i}`}
              style={{
                gap: t.spacing.md,
                borderTopWidth: i ? 1 : 0,
                borderTopColor: t.colors.divider,
                paddingTop: i ? t.spacing.lg : 0,
              }}
            >
              {textField(`Reaction ${i + 1} name`, ["reactions", i, "name"])}
              {row(
                <>
                  <Field
                    label={`Consumed by ${r.name || `reaction ${i + 1}`}`}
                    hint="e.g. rptC, or A + B; empty for none"
                    value={texts[key(["reactions", i, "reactants"])] ?? formatStoich(r.reactants)}
                    onChangeText={(v) => {
                      setTexts((s) => ({ ...s, [key(["reactions", i, "reactants"])]: v }));
                      update(["reactions", i, "reactants"], parseStoich(v));
                    }}
                    error={errorUnder(["reactions", i, "reactants"])}
                    autoCapitalize="none"
                    style={grow(160)}
                  />
                  <Field
                    label={`Made by ${r.name || `reaction ${i + 1}`}`}
                    hint="e.g. hldB; empty for none"
                    value={texts[key(["reactions", i, "products"])] ?? formatStoich(r.products)}
                    onChangeText={(v) => {
                      setTexts((s) => ({ ...s, [key(["reactions", i, "products"])]: v }));
                      update(["reactions", i, "products"], parseStoich(v));
                    }}
                    error={errorUnder(["reactions", i, "products"])}
                    autoCapitalize="none"
                    style={grow(160)}
                  />
                </>,
              )}
              <Choice
                label={`Rate law of ${r.name || `reaction ${i + 1}`}`}
                value={kind}
                options={[
                  { value: "massAction", label: "Mass action" },
                  { value: "constant", label: "Constant" },
                  { value: "regulated", label: "Regulated (Hill)" },
                ]}
                onChange={(k) =>
                  update(
                    ["reactions", i, "rate"],
                    k === "regulated"
                      ? {
                          kind: "regulated",
                          maxRatePerMinute: 1,
                          logic: "and",
                          leakFraction: 0,
                          regulators: [
                            {
                              source: defaultRegulatorSource(circuit, i),
                              effect: "activates",
                              halfMax: 10,
                              hill: 2,
                            },
                          ],
                        }
                      : { kind: k, ratePerMinute: 0.1 },
                  )
                }
              />
              {kind === "regulated" ? (
                <>
                  {row(
                    <>
                      {numberField(
                        "Maximal rate",
                        ["reactions", i, "rate", "maxRatePerMinute"],
                        "molecules per minute",
                      )}
                      {numberField("Leak fraction", ["reactions", i, "rate", "leakFraction"], "0 to 1")}
                    </>,
                  )}
                  <Choice
                    label="How regulators combine"
                    value={(r.rate as { logic?: "and" | "or" }).logic ?? "and"}
                    options={[
                      { value: "and", label: "AND (all needed)" },
                      { value: "or", label: "OR (any one)" },
                    ]}
                    onChange={(v) => update(["reactions", i, "rate", "logic"], v)}
                  />
                  {regs.map((g, j) => (
                    <View
                      key={j}
                      style={{
                        gap: t.spacing.sm,
                        padding: t.spacing.md,
                        borderRadius: t.radii.md,
                        backgroundColor: t.colors.surfaceAlt,
                      }}
                    >
                      {row(
                        <>
                          <View style={grow(140)}>
                            {textField(`Regulator ${j + 1} of ${r.name || `reaction ${i + 1}`}`, [
                              "reactions",
                              i,
                              "rate",
                              "regulators",
                              j,
                              "source",
                            ])}
                          </View>
                          {numberField("Half-max K", ["reactions", i, "rate", "regulators", j, "halfMax"], "molecules")}
                          {numberField("Hill coefficient n", ["reactions", i, "rate", "regulators", j, "hill"])}
                        </>,
                      )}
                      <Choice
                        label={`Effect of ${g.source || `regulator ${j + 1}`}`}
                        value={g.effect ?? "activates"}
                        options={[
                          { value: "activates", label: "Activates" },
                          { value: "represses", label: "Represses" },
                        ]}
                        onChange={(v) => update(["reactions", i, "rate", "regulators", j, "effect"], v)}
                      />
                      <Button
                        label={`Remove regulator ${g.source || j + 1}`}
                        variant="ghost"
                        compact
                        icon="trash-2"
                        style={{ alignSelf: "flex-start" }}
                        onPress={() =>
                          update(
                            ["reactions", i, "rate", "regulators"],
                            regs.filter((_, k) => k !== j),
                          )
                        }
                      />
                    </View>
                  ))}
                  {errorAt(["reactions", i, "rate", "regulators"]) ? (
                    <Text variant="caption" tone="danger" role="alert">
                      {errorAt(["reactions", i, "rate", "regulators"])}
                    </Text>
                  ) : null}
                  <Button
                    label="Add regulator"
                    variant="secondary"
                    compact
                    icon="plus"
                    style={{ alignSelf: "flex-start" }}
                    onPress={() =>
                      update(["reactions", i, "rate", "regulators", regs.length], {
                        source: "",
                        effect: "activates",
                        halfMax: 10,
                        hill: 2,
                      })
                    }
                  />
                </>
              ) : (
                numberField(
                  kind === "constant" ? "Rate" : "Rate constant",
                  ["reactions", i, "rate", "ratePerMinute"],
                  kind === "constant" ? "molecules per minute" : "per minute",
                  false,
                  false,
                )
              )}
              <Field
                label="Only while this signal is on (optional)"
                value={r.scaledBy ?? ""}
                onChangeText={(v) => update(["reactions", i, "scaledBy"], v.trim() === "" ? undefined : v)}
                error={errorAt(["reactions", i, "scaledBy"])}
                autoCapitalize="none"
                hint="A signal name that multiplies the whole rate."
              />
              {errorUnder(["reactions", i, "modifiers"]) ? (
                <Text variant="caption" tone="danger" role="alert">
                  {errorUnder(["reactions", i, "modifiers"])}
                </Text>
              ) : null}
              <Button
                label={`Remove reaction ${r.name || i + 1}`}
                variant="ghost"
                compact
                icon="trash-2"
                style={{ alignSelf: "flex-start" }}
                onPress={() =>
                  update(
                    ["reactions"],
                    reactions.filter((_, j) => j !== i),
                  )
                }
              />
            </View>
          );
        })}
        {errorAt(["reactions"]) ? (
          <Text variant="caption" tone="danger" role="alert">
            {errorAt(["reactions"])}
          </Text>
        ) : null}
        <Button
          label="Add reaction"
          variant="secondary"
          icon="plus"
          style={{ alignSelf: "flex-start" }}
          onPress={() =>
            update(["reactions", reactions.length], {
              name: `R${reactions.length + 1}`,
              reactants: [],
              products: [],
              modifiers: [],
              rate: { kind: "massAction", ratePerMinute: 0.1 },
            })
          }
        />
      </Card>

      {showAll && errorCount > 0 ? (
        <Banner
          tone="danger"
          testID="circuit-form-errors"
        >{`${errorCount} field${errorCount === 1 ? " needs" : "s need"} attention before saving.`}</Banner>
      ) : null}
      <Button label={submitLabel} icon="save" onPress={submit} busy={busy} testID="circuit-save" />
    </View>
  );
}
