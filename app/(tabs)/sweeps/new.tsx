import React, { useState } from "react";
import { View } from "react-native";
import { API_LIMITS } from "@/shared/limits";
import { useRouter } from "expo-router";
import { Screen } from "@/components/ui/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { Banner, LoadingState } from "@/components/ui/states";
import { useCircuit, useCircuits } from "@/components/data/circuits";
import { pickerOptions } from "@/components/data/paged";
import { LoadMore } from "@/components/ui/load-more";
import { usePrograms, useProgram } from "@/components/data/programs";
import { useLaunchSweep } from "@/components/data/sweeps";
import { useLaunchRegimeMap } from "@/components/data/regime-maps";
import { ApiError } from "@/components/data/api";
import { randomSeed } from "@/components/forms/run-settings";
import { parseNumber } from "@/components/forms/zod-errors";
import { suggestedEndTime } from "@/components/forms/program-editor";
import { useTheme } from "@/components/theme/use-theme";

export default function NewSweep() {
  const t = useTheme();
  const router = useRouter();
  const circuits = useCircuits();
  const programs = usePrograms();
  const [circuitId, setCircuitId] = useState("");
  const [programId, setProgramId] = useState("");
  const circuit = useCircuit(circuitId || undefined);
  const program = useProgram(programId || undefined);
  const [parameter, setParameter] = useState("");
  const [from, setFrom] = useState("");
  const [to, setTo] = useState("");
  const [count, setCount] = useState("6");
  const [scale, setScale] = useState<"linear" | "log">("log");
  const [replicates, setReplicates] = useState("100");
  const [seed, setSeed] = useState(randomSeed);
  const [name, setName] = useState("");
  const [thresholdValue, setThresholdValue] = useState("");
  const [windowMinutes, setWindowMinutes] = useState("");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const launchSweep = useLaunchSweep();
  const launchMap = useLaunchRegimeMap();
  const [kind, setKind] = useState<"sweep" | "map">("sweep");
  const launch = kind === "map" ? launchMap : launchSweep;
  const server = launch.error instanceof ApiError ? launch.error : null;
  if (circuits.isPending || programs.isPending)
    return (
      <Screen back={{ href: "/sweeps", label: "Sweeps" }} title="New sweep">
        <LoadingState />
      </Screen>
    );
  const params = circuit.data?.parameters ?? [];
  const submit = () => {
    const e: Record<string, string> = {};
    if (!circuitId) e.circuit = "Choose a circuit.";
    if (!programId) e.program = "Choose an input program.";
    if (!parameter) e.parameter = "Choose a parameter to sweep.";
    const f = parseNumber(from),
      tt = parseNumber(to),
      n = parseNumber(count),
      reps = parseNumber(replicates);
    if (!Number.isFinite(f)) e.from = "Enter a number.";
    if (!Number.isFinite(tt)) e.to = "Enter a number.";
    if (scale === "log" && (f <= 0 || tt <= 0)) e.from = "A log grid needs positive ends.";
    if (!Number.isInteger(n) || n < 2 || n > API_LIMITS.maxSweepPoints)
      e.count = `Between 2 and ${API_LIMITS.maxSweepPoints} values.`;
    if (!Number.isInteger(reps) || reps < 1) e.replicates = "A whole number of at least 1.";
    if (!name.trim()) e.name = "Give the sweep a name.";
    const th = thresholdValue.trim() ? parseNumber(thresholdValue) : undefined;
    const win = windowMinutes.trim() ? parseNumber(windowMinutes) : undefined;
    if (th !== undefined && !(th > 0)) e.thresholdValue = "Threshold must be positive (or empty for the default).";
    if (win !== undefined && !(win > 0)) e.windowMinutes = "Window must be positive (or empty for the default).";
    setErrors(e);
    if (Object.keys(e).length || !program.data) return;
    const req = {
      name: name.trim(),
      base: {
        circuitId,
        programId,
        settings: {
          endTimeMinutes: suggestedEndTime(program.data.body),
          gridStepMinutes: 1,
          replicates: reps,
          seed,
          // One threshold for every point, so their figures compare (the default would follow each point's own steady state).
          threshold: { value: th, windowMinutes: win },
        },
      },
      axes: [{ parameter, grid: { from: f, to: tt, count: n, scale } }],
    };
    if (kind === "map") launchMap.mutate(req, { onSuccess: (d) => router.replace(`/sweeps/maps/${d.id}`) });
    else launchSweep.mutate(req, { onSuccess: (d) => router.replace(`/sweeps/${d.id}`) });
  };
  return (
    <Screen
      back={{ href: "/sweeps", label: "Sweeps" }}
      title="New sweep"
      subtitle="One parameter over a grid of values; each value is its own run."
    >
      {server ? <Banner tone="danger">{server.message}</Banner> : null}
      <Card>
        <Choice
          label="Compute"
          value={kind}
          options={[
            { value: "sweep", label: "Sweep: stochastic runs and mean-field labels" },
            { value: "map", label: "Mean-field map only: quick, no stochastic simulation" },
          ]}
          onChange={setKind}
        />
      </Card>
      <Card>
        <Field label="Sweep name" value={name} onChangeText={setName} error={errors.name} />
        <Choice
          label="Circuit"
          value={circuitId}
          options={pickerOptions(circuits.data, circuit.data?.circuit)}
          onChange={(id) => {
            setCircuitId(id);
            setParameter("");
          }}
        />
        <LoadMore list={circuits} noun="circuits" testID="sweep-circuits-more" />
        {errors.circuit ? (
          <Text variant="caption" tone="danger" role="alert">
            {errors.circuit}
          </Text>
        ) : null}
        <Choice
          label="Input program"
          value={programId}
          options={pickerOptions(programs.data, program.data?.program)}
          onChange={setProgramId}
        />
        <LoadMore list={programs} noun="programs" testID="sweep-programs-more" />
        {errors.program ? (
          <Text variant="caption" tone="danger" role="alert">
            {errors.program}
          </Text>
        ) : null}
      </Card>
      {params.length ? (
        <Card>
          <Choice
            label="Parameter"
            value={parameter}
            options={params.map((p) => ({
              value: p.ref,
              label: `${p.label} (now ${p.value}${p.unit ? ` ${p.unit}` : ""})`,
            }))}
            onChange={(ref) => {
              setParameter(ref);
              const p = params.find((x) => x.ref === ref);
              if (p && p.value > 0) {
                setFrom(String(p.value / 4));
                setTo(String(p.value * 4));
              }
            }}
          />
          {errors.parameter ? (
            <Text variant="caption" tone="danger" role="alert">
              {errors.parameter}
            </Text>
          ) : null}
          <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}>
            <Field
              label="From"
              value={from}
              onChangeText={setFrom}
              error={errors.from}
              keyboardType="decimal-pad"
              style={{ flexGrow: 1, flexBasis: 120 }}
            />
            <Field
              label="To"
              value={to}
              onChangeText={setTo}
              error={errors.to}
              keyboardType="decimal-pad"
              style={{ flexGrow: 1, flexBasis: 120 }}
            />
            <Field
              label="Number of values"
              value={count}
              onChangeText={setCount}
              error={errors.count}
              keyboardType="number-pad"
              style={{ flexGrow: 1, flexBasis: 120 }}
            />
          </View>
          <Choice
            label="Spacing"
            value={scale}
            options={[
              { value: "log", label: "Logarithmic" },
              { value: "linear", label: "Even" },
            ]}
            onChange={setScale}
          />
        </Card>
      ) : circuitId ? (
        <LoadingState label="Loading parameters" />
      ) : null}
      <Card>
        <Field
          label="Replicates per value"
          value={replicates}
          onChangeText={setReplicates}
          error={errors.replicates}
          keyboardType="number-pad"
        />
        <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}>
          <Field
            label="Threshold"
            unit="molecules"
            value={thresholdValue}
            onChangeText={setThresholdValue}
            error={errors.thresholdValue ?? server?.fieldMap?.()["base.settings.threshold.value"]}
            keyboardType="decimal-pad"
            hint="Default: half of each point's own ODE steady state when on. Set one value to compare points on the same footing."
            style={{ flexGrow: 1, flexBasis: 150 }}
          />
          <Field
            label="Response window"
            unit="min"
            value={windowMinutes}
            onChangeText={setWindowMinutes}
            error={errors.windowMinutes ?? server?.fieldMap?.()["base.settings.threshold.windowMinutes"]}
            keyboardType="decimal-pad"
            hint="Default: 3 output lifetimes."
            style={{ flexGrow: 1, flexBasis: 150 }}
          />
        </View>
        <View style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "flex-end", flexWrap: "wrap" }}>
          <Field
            label="Seed"
            value={seed}
            onChangeText={setSeed}
            autoCapitalize="none"
            style={{ flexGrow: 1, flexBasis: 200 }}
          />
          <Button label="New random seed" variant="secondary" icon="refresh-cw" onPress={() => setSeed(randomSeed())} />
        </View>
      </Card>
      <Button
        label={kind === "map" ? "Compute map" : "Launch sweep"}
        icon="play"
        onPress={submit}
        busy={launch.isPending}
      />
    </Screen>
  );
}
