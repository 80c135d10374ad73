/**
 * The input-program form: one set of fields per program kind, checked with the
 * shared InputProgramSchema as the user types, and a live preview plot of the
 * signal (compiled by the server, drawn by the lazy chart).
 */
import React, { useEffect, useMemo, useState } from "react";
import { View } from "react-native";
import { InputProgramSchema, type InputProgramInput } from "@/shared/schemas/input-program";
import type { ProgramKind } from "@/shared/schemas/api-programs";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Banner } from "@/components/ui/states";
import { issuesToMap, parseNumber } from "./zod-errors";

export const PROGRAM_DEFAULTS: Record<ProgramKind, InputProgramInput> = {
  ladder: { kind: "ladder", start: 60, durations: [1, 2, 5, 10, 20, 40, 80], repeats: 1, gap: 240 },
  periodic: { kind: "periodic", start: 30, onDuration: 10, offDuration: 50, count: 10 },
  pulses: {
    kind: "pulses",
    pulses: [
      { start: 30, duration: 5 },
      { start: 200, duration: 60 },
    ],
  },
  random: {
    kind: "random",
    start: 0,
    meanInterval: 45,
    durations: { dist: "uniform", min: 2, max: 5 },
    seed: "program",
    perReplicate: false,
    extraPulses: [{ start: 600, duration: 60 }],
  },
};

/** The name a program of each kind gets until the user names it. */
export const PROGRAM_KIND_NAMES: Record<ProgramKind, string> = {
  ladder: "Duration ladder",
  periodic: "Periodic train",
  pulses: "Pulse list",
  random: "Random spikes",
};

/**
 * The name after switching kind: a default (or empty) name follows the new
 * kind; a name the user chose is kept.
 */
export function nameAfterKindChange(name: string, from: ProgramKind, to: ProgramKind): string {
  const n = name.trim();
  return n === "" || n === PROGRAM_KIND_NAMES[from] ? PROGRAM_KIND_NAMES[to] : name;
}

/** A sensible preview end: the last pulse's end plus a margin. */
export function suggestedEndTime(p: InputProgramInput): number {
  switch (p.kind) {
    case "ladder": {
      const reps = p.repeats ?? 1;
      const total = (p.durations ?? []).reduce((a, d) => a + (Number(d) || 0) + (Number(p.gap) || 0), 0) * reps;
      return Math.max(60, Math.round((Number(p.start) || 0) + total));
    }
    case "periodic":
      return Math.round(
        (Number(p.start) || 0) +
          ((Number(p.onDuration) || 0) + (Number(p.offDuration) || 0)) * Math.min(p.count ?? 10, 50),
      );
    case "pulses":
      return Math.max(60, ...(p.pulses ?? []).map((x) => (Number(x.start) || 0) + (Number(x.duration) || 0) + 60));
    case "random":
      return Math.max(
        600,
        ...(p.extraPulses ?? []).map((x) => (Number(x.start) || 0) + (Number(x.duration) || 0) + 60),
      );
  }
}

export type ProgramEditorProps = {
  initialName: string;
  initial: InputProgramInput;
  submitLabel: string;
  busy?: boolean;
  serverErrors?: Record<string, string>;
  serverMessage?: string;
  onSubmit: (name: string, body: InputProgramInput) => void;
  /** Renders the preview for a valid program (kept out so tests need no server). */
  renderPreview?: (program: InputProgramInput, endTimeMinutes: number) => React.ReactNode;
  allowKindChange?: boolean;
};

export function ProgramEditor({
  initialName,
  initial,
  submitLabel,
  busy,
  serverErrors = {},
  serverMessage,
  onSubmit,
  renderPreview,
  allowKindChange = true,
}: ProgramEditorProps) {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const [name, setName] = useState(initialName);
  const [program, setProgram] = useState<InputProgramInput>(initial);
  const [texts, setTexts] = useState<Record<string, string>>({});
  const [touched, setTouched] = useState<Set<string>>(new Set());
  const [showAll, setShowAll] = useState(false);
  const [endText, setEndText] = useState<string | null>(null);

  const parsed = useMemo(() => InputProgramSchema.safeParse(program), [program]);
  const errors = useMemo(() => (parsed.success ? {} : issuesToMap(parsed.error.issues)), [parsed]);
  const nameError = name.trim() ? undefined : "Give the program a name.";
  const errorAt = (k: string) =>
    serverErrors[k] && !touched.has(k) ? serverErrors[k] : showAll || touched.has(k) ? errors[k] : undefined;
  const set = (k: string, v: unknown) => {
    setProgram((p) => {
      const next = { ...p } as Record<string, unknown>;
      if (v === undefined) delete next[k];
      else next[k] = v;
      return next as InputProgramInput;
    });
    setTouched((s) => new Set(s).add(k));
  };
  const num = (
    label: string,
    k: string,
    unit?: string,
    optional = false,
    value?: unknown,
    onSet?: (v: number | undefined) => void,
  ) => {
    const raw = value !== undefined ? value : (program as Record<string, unknown>)[k];
    return (
      <Field
        label={label}
        unit={unit}
        keyboardType="decimal-pad"
        value={texts[k] ?? (raw === undefined || Number.isNaN(raw) ? "" : String(raw))}
        onChangeText={(txt) => {
          setTexts((s) => ({ ...s, [k]: txt }));
          const v = optional && txt.trim() === "" ? undefined : parseNumber(txt);
          if (onSet) {
            onSet(v);
            setTouched((s) => new Set(s).add(k));
          } else set(k, v);
        }}
        error={errorAt(k)}
        testID={`program-${k}`}
        style={{ flexGrow: 1, flexBasis: 150 }}
      />
    );
  };
  const row = (children: React.ReactNode) => (
    <View style={{ flexDirection: isWide ? "row" : "column", gap: t.spacing.md, flexWrap: "wrap" }}>{children}</View>
  );

  // Preview: debounced, only for a valid program.
  const suggested = suggestedEndTime(program);
  const endTime =
    endText !== null && Number.isFinite(parseNumber(endText)) && parseNumber(endText) > 0
      ? parseNumber(endText)
      : suggested;
  const [previewArgs, setPreviewArgs] = useState<{ program: InputProgramInput; end: number } | null>(
    parsed.success ? { program, end: endTime } : null,
  );
  useEffect(() => {
    if (!parsed.success) return;
    const h = setTimeout(() => setPreviewArgs({ program, end: endTime }), 400);
    return () => clearTimeout(h);
  }, [program, endTime, parsed.success]);

  const kindFields = () => {
    const p = program;
    if (p.kind === "ladder") {
      const k = "durations";
      return (
        <>
          {row(
            <>
              {num("Start", "start", "min")}
              {num("Recovery gap", "gap", "min")}
              {num("Repeats of each duration", "repeats")}
            </>,
          )}
          <Field
            label="Pulse durations"
            unit="min, separated by commas"
            value={texts[k] ?? (p.durations ?? []).join(", ")}
            onChangeText={(txt) => {
              setTexts((s) => ({ ...s, [k]: txt }));
              set(
                k,
                txt
                  .split(/[,;\s]+/)
                  .filter(Boolean)
                  .map(parseNumber),
              );
            }}
            error={errorAt(k) ?? Object.entries(errors).find(([e]) => e.startsWith("durations."))?.[1]}
            testID="program-durations"
          />
          {num("Signal level while on (optional)", "level", "signal units", true)}
        </>
      );
    }
    if (p.kind === "periodic") {
      return (
        <>
          {row(
            <>
              {num("Start", "start", "min")}
              {num("On for", "onDuration", "min")}
              {num("Off for", "offDuration", "min")}
            </>,
          )}
          {row(
            <>
              {num("Number of pulses (optional)", "count", undefined, true)}
              {num("Signal level while on (optional)", "level", "signal units", true)}
            </>,
          )}
        </>
      );
    }
    if (p.kind === "pulses") {
      const pulses = p.pulses ?? [];
      return (
        <>
          {pulses.map((x, i) => (
            <View key={i} style={{ gap: t.spacing.sm }}>
              {row(
                <>
                  {num(`Pulse ${i + 1} start`, `pulses.${i}.start`, "min", false, x.start, (v) =>
                    set(
                      "pulses",
                      pulses.map((q, j) => (j === i ? { ...q, start: v } : q)),
                    ),
                  )}
                  {num(`Pulse ${i + 1} duration`, `pulses.${i}.duration`, "min", false, x.duration, (v) =>
                    set(
                      "pulses",
                      pulses.map((q, j) => (j === i ? { ...q, duration: v } : q)),
                    ),
                  )}
                </>,
              )}
              <Button
                label={`Remove pulse ${i + 1}`}
                variant="ghost"
                compact
                icon="trash-2"
                style={{ alignSelf: "flex-start" }}
                onPress={() =>
                  set(
                    "pulses",
                    pulses.filter((_, j) => j !== i),
                  )
                }
              />
            </View>
          ))}
          {errorAt("pulses") ? (
            <Text variant="caption" tone="danger" role="alert">
              {errorAt("pulses")}
            </Text>
          ) : null}
          <Button
            label="Add pulse"
            variant="secondary"
            icon="plus"
            style={{ alignSelf: "flex-start" }}
            onPress={() => set("pulses", [...pulses, { start: (pulses.at(-1)?.start ?? 0) + 120, duration: 10 }])}
          />
        </>
      );
    }
    const d = p.durations;
    const setDist = (v: Record<string, unknown>) => set("durations", { ...d, ...v });
    return (
      <>
        {row(
          <>
            {num("Start", "start", "min")}
            {num("Mean time between pulse starts", "meanInterval", "min")}
          </>,
        )}
        <Choice
          label="Pulse durations are drawn from"
          value={d.dist}
          options={[
            { value: "uniform", label: "Uniform" },
            { value: "exponential", label: "Exponential" },
            { value: "gamma", label: "Gamma" },
          ]}
          onChange={(dist) =>
            set(
              "durations",
              dist === "uniform"
                ? { dist, min: 2, max: 5 }
                : dist === "exponential"
                  ? { dist, mean: 3 }
                  : { dist, mean: 3, shape: 2 },
            )
          }
        />
        {d.dist === "uniform"
          ? row(
              <>
                {num("Shortest duration", "durations.min", "min", false, d.min, (v) => setDist({ min: v }))}
                {num("Longest duration", "durations.max", "min", false, d.max, (v) => setDist({ max: v }))}
              </>,
            )
          : d.dist === "exponential"
            ? num("Mean duration", "durations.mean", "min", false, d.mean, (v) => setDist({ mean: v }))
            : row(
                <>
                  {num("Mean duration", "durations.mean", "min", false, d.mean, (v) => setDist({ mean: v }))}
                  {num("Shape", "durations.shape", undefined, false, d.shape, (v) => setDist({ shape: v }))}
                </>,
              )}
        <Field
          label="Program seed"
          value={p.seed ?? ""}
          onChangeText={(v) => set("seed", v)}
          error={errorAt("seed")}
          autoCapitalize="none"
          hint="The same seed gives the same pulse train."
        />
        <Choice
          label="Pulse train"
          value={p.perReplicate ? "each" : "shared"}
          options={[
            { value: "shared", label: "Shared by all replicates" },
            { value: "each", label: "Drawn for each replicate" },
          ]}
          onChange={(v) => set("perReplicate", v === "each")}
        />
        {(p.extraPulses ?? []).map((x, i) => (
          <View key={i} style={{ gap: t.spacing.sm }}>
            {row(
              <>
                {num(`Added pulse ${i + 1} start`, `extraPulses.${i}.start`, "min", false, x.start, (v) =>
                  set(
                    "extraPulses",
                    (p.extraPulses ?? []).map((q, j) => (j === i ? { ...q, start: v } : q)),
                  ),
                )}
                {num(`Added pulse ${i + 1} duration`, `extraPulses.${i}.duration`, "min", false, x.duration, (v) =>
                  set(
                    "extraPulses",
                    (p.extraPulses ?? []).map((q, j) => (j === i ? { ...q, duration: v } : q)),
                  ),
                )}
              </>,
            )}
            <Button
              label={`Remove added pulse ${i + 1}`}
              variant="ghost"
              compact
              icon="trash-2"
              style={{ alignSelf: "flex-start" }}
              onPress={() =>
                set(
                  "extraPulses",
                  (p.extraPulses ?? []).filter((_, j) => j !== i),
                )
              }
            />
          </View>
        ))}
        <Button
          label="Add a fixed pulse (e.g. a true exposure)"
          variant="secondary"
          icon="plus"
          style={{ alignSelf: "flex-start" }}
          onPress={() => set("extraPulses", [...(p.extraPulses ?? []), { start: 600, duration: 60 }])}
        />
      </>
    );
  };

  const errorCount = Object.keys(errors).length + (nameError ? 1 : 0);
  return (
    <View style={{ gap: t.spacing.lg }}>
      {serverMessage ? (
        <Banner tone="danger" testID="program-server-error">
          {serverMessage}
        </Banner>
      ) : null}
      <Card>
        <Field
          label="Program name"
          value={name}
          onChangeText={(v) => {
            setName(v);
            setTouched((s) => new Set(s).add("name"));
          }}
          error={(showAll || touched.has("name") ? nameError : undefined) ?? serverErrors.name}
          testID="program-name"
        />
        {allowKindChange ? (
          <Choice<ProgramKind>
            label="Kind of program"
            value={program.kind}
            testID="program-kind"
            options={(Object.keys(PROGRAM_KIND_NAMES) as ProgramKind[]).map((k) => ({
              value: k,
              label: PROGRAM_KIND_NAMES[k],
            }))}
            onChange={(k) => {
              setName((n) => nameAfterKindChange(n, program.kind, k));
              setProgram(PROGRAM_DEFAULTS[k]);
              setTexts({});
              setTouched(new Set());
            }}
          />
        ) : null}
      </Card>
      <Card>
        <Text variant="heading">Schedule</Text>
        {kindFields()}
      </Card>
      <Card>
        <Text variant="heading">Preview</Text>
        <Field
          label="Preview until"
          unit="min"
          keyboardType="decimal-pad"
          value={endText ?? String(suggested)}
          onChangeText={setEndText}
          hint="Only for the preview; the run sets its own end time."
        />
        {previewArgs && renderPreview ? renderPreview(previewArgs.program, previewArgs.end) : null}
        {!parsed.success ? (
          <Text variant="caption" tone="muted">
            The preview updates when every field is valid.
          </Text>
        ) : null}
      </Card>
      {showAll && errorCount > 0 ? (
        <Banner
          tone="danger"
          testID="program-form-errors"
        >{`${errorCount} field${errorCount === 1 ? " needs" : "s need"} attention before saving.`}</Banner>
      ) : null}
      <Button
        label={submitLabel}
        icon="save"
        busy={busy}
        testID="program-save"
        onPress={() => {
          setShowAll(true);
          if (parsed.success && !nameError) onSubmit(name.trim(), program);
        }}
      />
    </View>
  );
}
