import React, { useEffect, useMemo, useState } from "react";
import { View } from "react-native";
import { useLocalSearchParams, useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { Banner, EmptyState, ErrorState, LoadingState } from "@/components/ui/states";
import { useCircuit, useCircuits } from "@/components/data/circuits";
import { pickerOptions } from "@/components/data/paged";
import { LoadMore } from "@/components/ui/load-more";
import { useProgram, usePrograms } from "@/components/data/programs";
import { useLaunchRun, useRunEstimate } from "@/components/data/runs";
import { ApiError } from "@/components/data/api";
import { randomSeed, toLaunchRequest, validateRunForm, type RunFormValues } from "@/components/forms/run-settings";
import { suggestedEndTime } from "@/components/forms/program-editor";
import { formatCount, formatNumber, formatSeconds } from "@/shared/number-format";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";

/** An estimate of computing time: "about 45 s", "about 12 min", "about 1.5 h" (at least 1 s). */
function aboutSeconds(s: number): string {
  return `about ${formatSeconds(Math.max(1, s))}`;
}

export default function NewRun() {
  const t = useTheme();
  const router = useRouter();
  const { isWide } = useBreakpoints();
  const params = useLocalSearchParams<{ circuitId?: string; programId?: string }>();
  const circuits = useCircuits();
  const programs = usePrograms();
  const [typed, setTyped] = useState<RunFormValues>(() => ({
    name: "",
    circuitId: params.circuitId ?? "",
    programId: params.programId ?? "",
    inputSignal: "",
    replicates: "200",
    seed: randomSeed(),
    endTimeMinutes: "",
    gridStepMinutes: "1",
    thresholdValue: "",
    hysteresis: "0.2",
    windowMinutes: "",
    noiseDurationMinutes: "10",
  }));
  const [showAll, setShowAll] = useState(false);
  const [touched, setTouched] = useState<Set<string>>(new Set());
  const circuit = useCircuit(typed.circuitId || undefined);
  const program = useProgram(typed.programId || undefined);
  const launch = useLaunchRun();
  const set = (k: keyof RunFormValues, value: string) => {
    setTyped((s) => ({ ...s, [k]: value }));
    setTouched((s) => new Set(s).add(k));
  };

  // Defaults that follow the choices (derived while rendering, so no effect has to copy them into state):
  // the first signal, an end time covering the program and a name, until the person types their own.
  const v = useMemo<RunFormValues>(() => {
    const signals = circuit.data?.body.signals ?? [];
    return {
      ...typed,
      inputSignal:
        signals.length && !signals.some((s) => s.name === typed.inputSignal) ? signals[0].name : typed.inputSignal,
      endTimeMinutes:
        program.data && !touched.has("endTimeMinutes")
          ? String(suggestedEndTime(program.data.body))
          : typed.endTimeMinutes,
      name:
        !touched.has("name") && circuit.data && program.data
          ? `${circuit.data.circuit.name} · ${program.data.program.name}`
          : typed.name,
    };
  }, [typed, touched, circuit.data, program.data]);

  const errors = validateRunForm(v);
  const valid = Object.keys(errors).length === 0;
  const [estimateReq, setEstimateReq] = useState<ReturnType<typeof toLaunchRequest> | null>(null);
  useEffect(() => {
    if (!valid) return;
    const h = setTimeout(() => setEstimateReq(toLaunchRequest(v)), 400);
    return () => clearTimeout(h);
  }, [v, valid]);
  const estimate = useRunEstimate(estimateReq);
  const server = launch.error instanceof ApiError ? launch.error : null;
  const serverFields = server?.fieldMap() ?? {};
  const err = (k: keyof RunFormValues, serverKey?: string) =>
    (showAll || touched.has(k) ? errors[k] : undefined) ?? (serverKey ? serverFields[serverKey] : undefined);

  if (circuits.isPending || programs.isPending)
    return (
      <Screen back={{ href: "/runs", label: "Runs" }} title="Start a study">
        <LoadingState />
      </Screen>
    );
  if (circuits.error || programs.error)
    return (
      <Screen back={{ href: "/runs", label: "Runs" }} title="Start a study">
        <ErrorState
          error={circuits.error ?? programs.error}
          onRetry={() => {
            circuits.refetch();
            programs.refetch();
          }}
        />
      </Screen>
    );
  if (!circuits.data.length || !programs.data.length) {
    return (
      <Screen back={{ href: "/runs", label: "Runs" }} title="Start a study">
        <EmptyState
          title={!circuits.data.length ? "Make a circuit first" : "Make an input program first"}
          message="A study runs one circuit under one input program."
          actionLabel={!circuits.data.length ? "New circuit" : "New program"}
          actionHref={!circuits.data.length ? "/circuits/new" : "/programs/new"}
        />
      </Screen>
    );
  }
  const row = (children: React.ReactNode) => (
    <View style={{ flexDirection: isWide ? "row" : "column", gap: t.spacing.md, flexWrap: "wrap" }}>{children}</View>
  );
  const signals = circuit.data?.body.signals ?? [];
  return (
    <Screen
      back={{ href: "/runs", label: "Runs" }}
      title="Start a study"
      subtitle="One circuit, one input program, many stochastic replicates."
    >
      {server && !server.fields.length ? (
        <Banner tone="danger" testID="launch-error">
          {server.message}
        </Banner>
      ) : null}
      <Card>
        <Text variant="heading">What to simulate</Text>
        <Choice
          label="Circuit"
          testID="run-circuit"
          value={v.circuitId}
          options={pickerOptions(circuits.data, circuit.data?.circuit)}
          onChange={(id) => set("circuitId", id)}
        />
        <LoadMore list={circuits} noun="circuits" testID="run-circuits-more" />
        {err("circuitId", "circuitId") ? (
          <Text variant="caption" tone="danger" role="alert">
            {err("circuitId", "circuitId")}
          </Text>
        ) : null}
        <Choice
          label="Input program"
          testID="run-program"
          value={v.programId}
          options={pickerOptions(programs.data, program.data?.program)}
          onChange={(id) => set("programId", id)}
        />
        <LoadMore list={programs} noun="programs" testID="run-programs-more" />
        {err("programId", "programId") ? (
          <Text variant="caption" tone="danger" role="alert">
            {err("programId", "programId")}
          </Text>
        ) : null}
        {signals.length > 1 ? (
          <Choice
            label="Signal the program drives"
            value={v.inputSignal}
            options={signals.map((s) => ({ value: s.name, label: s.name }))}
            onChange={(s) => set("inputSignal", s)}
          />
        ) : null}
        <Field
          label="Run name"
          value={v.name}
          onChangeText={(x) => set("name", x)}
          error={err("name", "name")}
          testID="run-name"
        />
      </Card>
      <Card>
        <Text variant="heading">Settings</Text>
        {row(
          <>
            <Field
              label="Replicates"
              value={v.replicates}
              onChangeText={(x) => set("replicates", x)}
              error={err("replicates", "settings.replicates")}
              keyboardType="number-pad"
              testID="run-replicates"
              style={{ flexGrow: 1, flexBasis: 150 }}
            />
            <Field
              label="End time"
              unit="min"
              value={v.endTimeMinutes}
              onChangeText={(x) => set("endTimeMinutes", x)}
              error={err("endTimeMinutes", "settings.endTimeMinutes")}
              keyboardType="decimal-pad"
              testID="run-end-time"
              style={{ flexGrow: 1, flexBasis: 150 }}
            />
            <Field
              label="Grid step"
              unit="min"
              value={v.gridStepMinutes}
              onChangeText={(x) => set("gridStepMinutes", x)}
              error={err("gridStepMinutes", "settings.gridStepMinutes")}
              keyboardType="decimal-pad"
              testID="run-grid"
              style={{ flexGrow: 1, flexBasis: 150 }}
            />
          </>,
        )}
        <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "flex-end", flexWrap: "wrap" }}>
          <Field
            label="Seed"
            value={v.seed}
            onChangeText={(x) => set("seed", x)}
            error={err("seed", "settings.seed")}
            autoCapitalize="none"
            hint="Random by default; the same seed reproduces the run exactly."
            testID="run-seed"
            style={{ flexGrow: 1, flexBasis: 200 }}
          />
          <Button
            label="New random seed"
            variant="secondary"
            icon="refresh-cw"
            onPress={() => set("seed", randomSeed())}
          />
        </View>
      </Card>
      <Card>
        <Text variant="heading">Threshold</Text>
        <Text variant="caption" tone="muted">
          A pulse passes when the output crosses the threshold within the window. Leave a field empty for its default.
        </Text>
        {row(
          <>
            <Field
              label="Threshold"
              unit="molecules"
              value={v.thresholdValue}
              onChangeText={(x) => set("thresholdValue", x)}
              error={err("thresholdValue", "settings.threshold.value")}
              keyboardType="decimal-pad"
              hint="Default: half the ODE steady state when on."
              style={{ flexGrow: 1, flexBasis: 150 }}
            />
            <Field
              label="Hysteresis"
              unit="fraction"
              value={v.hysteresis}
              onChangeText={(x) => set("hysteresis", x)}
              error={err("hysteresis", "settings.threshold.hysteresis")}
              keyboardType="decimal-pad"
              style={{ flexGrow: 1, flexBasis: 150 }}
            />
          </>,
        )}
        {row(
          <>
            <Field
              label="Response window"
              unit="min"
              value={v.windowMinutes}
              onChangeText={(x) => set("windowMinutes", x)}
              error={err("windowMinutes", "settings.threshold.windowMinutes")}
              keyboardType="decimal-pad"
              hint="Default: 3 output lifetimes."
              style={{ flexGrow: 1, flexBasis: 150 }}
            />
            <Field
              label="Noise duration"
              unit="min"
              value={v.noiseDurationMinutes}
              onChangeText={(x) => set("noiseDurationMinutes", x)}
              error={err("noiseDurationMinutes", "settings.threshold.noiseDurationMinutes")}
              keyboardType="decimal-pad"
              hint="Shorter pulses count as noise for the false-pass rate."
              style={{ flexGrow: 1, flexBasis: 150 }}
            />
          </>,
        )}
      </Card>
      <Card testID="run-estimate">
        <Text variant="heading">Estimate</Text>
        {!valid ? (
          <Text tone="muted">Fill in the settings to see an estimate.</Text>
        ) : estimate.isPending ? (
          <Text tone="muted">Estimating…</Text>
        ) : estimate.error ? (
          <Text tone="danger">{(estimate.error as Error).message}</Text>
        ) : (
          <>
            <Text variant="bodyStrong">{aboutSeconds(estimate.data.estimatedSeconds)} of compute</Text>
            <Text variant="caption" tone="muted">
              {formatNumber(estimate.data.estimatedEvents)} reaction events · {formatCount(estimate.data.pulses)} input
              pulses · {formatCount(estimate.data.gridPoints)} grid points ·{" "}
              {formatCount(estimate.data.storedPulseRows)} stored pulse records
            </Text>
          </>
        )}
      </Card>
      {showAll && !valid ? <Banner tone="danger">Some settings need attention before launching.</Banner> : null}
      <Button
        label="Launch run"
        icon="play"
        busy={launch.isPending}
        testID="launch-run"
        onPress={() => {
          setShowAll(true);
          if (valid) launch.mutate(toLaunchRequest(v), { onSuccess: (run) => router.replace(`/runs/${run.id}`) });
        }}
      />
    </Screen>
  );
}
