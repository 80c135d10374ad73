/**
 * The preprocessing and threshold fields of a trace set (upload form and the
 * detail's edit card). Order follows the order they are applied
 * (docs/traces.md): gaps, smoothing, background, scale, then the threshold.
 */
import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { Field } from "@/components/ui/field";
import { Choice } from "@/components/ui/choice";
import { Text } from "@/components/ui/text";
import type { SettingsErrors, SettingsValues } from "./settings-form";

export function SettingsFields({
  values,
  errors,
  onChange,
  testIDPrefix = "trace",
}: {
  values: SettingsValues;
  errors: SettingsErrors;
  onChange: <K extends keyof SettingsValues>(key: K, value: SettingsValues[K]) => void;
  testIDPrefix?: string;
}) {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const row = (children: React.ReactNode) => (
    <View style={{ flexDirection: isWide ? "row" : "column", gap: t.spacing.md, flexWrap: "wrap" }}>{children}</View>
  );
  // Side by side when wide; in a phone column a flex basis would become a height.
  const half = isWide ? ({ flexGrow: 1, flexBasis: 180 } as const) : undefined;
  const id = (s: string) => `${testIDPrefix}-${s}`;
  return (
    <View style={{ gap: t.spacing.md }}>
      <Text variant="label">Threshold</Text>
      <Text variant="caption" tone="muted">
        In molecules, as for simulations; in trace units it is background + scale × threshold for each cell. Use the
        same value on the runs you match against.
      </Text>
      {row(
        <>
          <Field
            label="Threshold"
            unit="molecules"
            value={values.thresholdMolecules}
            onChangeText={(x) => onChange("thresholdMolecules", x)}
            error={errors.thresholdMolecules}
            keyboardType="decimal-pad"
            testID={id("threshold")}
            style={half}
          />
          <Field
            label="Hysteresis"
            unit="fraction"
            value={values.hysteresis}
            onChangeText={(x) => onChange("hysteresis", x)}
            error={errors.hysteresis}
            keyboardType="decimal-pad"
            testID={id("hysteresis")}
            style={half}
          />
        </>,
      )}
      {row(
        <>
          <Field
            label="Response window"
            unit="min"
            value={values.windowMinutes}
            onChangeText={(x) => onChange("windowMinutes", x)}
            error={errors.windowMinutes}
            keyboardType="decimal-pad"
            hint="Time after a pulse ends in which a crossing still counts."
            testID={id("window")}
            style={half}
          />
          <Field
            label="Noise duration"
            unit="min"
            value={values.noiseDurationMinutes}
            onChangeText={(x) => onChange("noiseDurationMinutes", x)}
            error={errors.noiseDurationMinutes}
            keyboardType="decimal-pad"
            hint="Shorter pulses count as noise for the false-pass rate."
            testID={id("noise")}
            style={half}
          />
        </>,
      )}

      <Choice
        label="Smoothing"
        testID={id("smoothing")}
        value={values.smoothingMode}
        options={[
          { value: "none", label: "None" },
          { value: "movingAverage", label: "Moving average" },
        ]}
        onChange={(m) => onChange("smoothingMode", m)}
      />
      {values.smoothingMode === "movingAverage" ? (
        <Field
          label="Moving-average width"
          unit="frames, odd"
          value={values.widthFrames}
          onChangeText={(x) => onChange("widthFrames", x)}
          error={errors["smoothing.widthFrames"]}
          keyboardType="number-pad"
          hint="Centred, never across a gap in the frames."
          testID={id("smoothing-width")}
        />
      ) : null}

      <Choice
        label="Background"
        testID={id("background")}
        value={values.backgroundMode}
        options={[
          { value: "preInput", label: "Before first pulse" },
          { value: "value", label: "Entered" },
          { value: "none", label: "None" },
        ]}
        onChange={(m) => onChange("backgroundMode", m)}
      />
      {values.backgroundMode === "value" ? (
        <Field
          label="Background"
          unit="trace units"
          value={values.backgroundValue}
          onChangeText={(x) => onChange("backgroundValue", x)}
          error={errors["background.value"]}
          keyboardType="decimal-pad"
          testID={id("background-units")}
        />
      ) : values.backgroundMode === "preInput" ? (
        <Text variant="caption" tone="muted">
          Each cell&apos;s median before the first input pulse.
        </Text>
      ) : null}

      <Choice
        label="Scale (trace units per molecule)"
        testID={id("scale")}
        value={values.scaleMode}
        options={[
          { value: "entered", label: "Entered" },
          { value: "fitPlateau", label: "Fitted from plateaus" },
        ]}
        onChange={(m) => onChange("scaleMode", m)}
      />
      {values.scaleMode === "entered" ? (
        <Field
          label="Scale factor"
          unit="trace units per molecule"
          value={values.unitsPerMolecule}
          onChangeText={(x) => onChange("unitsPerMolecule", x)}
          error={errors["scale.unitsPerMolecule"]}
          keyboardType="decimal-pad"
          testID={id("scale-value")}
        />
      ) : (
        row(
          <>
            <Field
              label="Model's ON steady state"
              unit="molecules"
              value={values.onSteadyStateMolecules}
              onChangeText={(x) => onChange("onSteadyStateMolecules", x)}
              error={errors["scale.onSteadyStateMolecules"]}
              keyboardType="decimal-pad"
              hint="Plateaus of long pulses are divided by this."
              testID={id("scale-steady")}
              style={half}
            />
            <Field
              label="Shortest pulse used"
              unit="min"
              value={values.minPulseMinutes}
              onChangeText={(x) => onChange("minPulseMinutes", x)}
              error={errors["scale.minPulseMinutes"]}
              keyboardType="decimal-pad"
              testID={id("scale-min-pulse")}
              style={half}
            />
          </>,
        )
      )}

      {row(
        <>
          <Field
            label="Gap factor"
            unit="frame intervals"
            value={values.gapFactor}
            onChangeText={(x) => onChange("gapFactor", x)}
            error={errors.gapFactor}
            keyboardType="decimal-pad"
            hint="A longer spacing between frames is a gap, never interpolated across."
            testID={id("gap-factor")}
            style={half}
          />
          <Field
            label="Longest allowed gap"
            unit="min, optional"
            value={values.maxGapMinutes}
            onChangeText={(x) => onChange("maxGapMinutes", x)}
            error={errors.maxGapMinutes}
            keyboardType="decimal-pad"
            hint="Pulses with a longer gap in their window are left out."
            testID={id("max-gap")}
            style={half}
          />
        </>,
      )}
    </View>
  );
}
