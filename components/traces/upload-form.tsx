/**
 * The trace upload form: a file (system picker), how to read it, where the
 * input schedule comes from, preprocessing; then Preview (parsed, stores
 * nothing) or Save. Checks run as the user types; a file the server rejects
 * shows its problems by line and column and the form keeps what was typed.
 */
import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { useBreakpoints } from "@/components/theme/use-breakpoints";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Choice } from "@/components/ui/choice";
import { Banner } from "@/components/ui/states";
import { ApiError } from "@/components/data/api";
import { uploadLines, type TraceFile, type UploadRequest } from "@/components/data/traces";
import { SettingsFields } from "./settings-fields";
import { UploadProblems } from "./upload-problems";
import { formatBytes, formatCount } from "@/shared/number-format";
import {
  UPLOAD_DEFAULTS,
  toUploadOptions,
  uploadServerErrors,
  validateUpload,
  type SettingsValues,
  type UploadValues,
} from "./settings-form";

function fileSize(n: number | null): string {
  if (n === null) return "size unknown";
  if (n < 1024) return `${formatCount(n)} bytes`;
  return formatBytes(n);
}

/** Settings error paths to the form field that holds them (for "touched"). */
const SETTING_FIELD: Record<string, keyof SettingsValues> = {
  "background.value": "backgroundValue",
  "scale.unitsPerMolecule": "unitsPerMolecule",
  "scale.onSteadyStateMolecules": "onSteadyStateMolecules",
  "scale.minPulseMinutes": "minPulseMinutes",
  "smoothing.widthFrames": "widthFrames",
};

export type TraceUploadFormProps = {
  programs: { id: string; name: string }[];
  /** Under the program choice: the control that loads more of the lab's programs (the list is paged). */
  programsMore?: React.ReactNode;
  /** Opens the system file picker; null when cancelled. */
  pickFile: () => Promise<TraceFile | null>;
  onPreview: (req: UploadRequest) => void;
  onSave: (req: UploadRequest) => void;
  previewBusy?: boolean;
  saveBusy?: boolean;
  /** The last preview or save error (ApiError / TraceUploadError). */
  error?: unknown;
  /** Renders the preview result; `requestKey` is what was sent, to tell a stale preview. */
  renderPreview?: (currentKey: string) => React.ReactNode;
  /** Called with the request key whenever Preview is pressed with a valid form. */
  onRequestKey?: (key: string) => void;
  initial?: Partial<UploadValues>;
};

/** A key that changes when the file or any option changes (to mark a preview out of date). */
export function requestKey(file: TraceFile | null, v: UploadValues): string {
  return JSON.stringify([file?.name ?? null, file?.size ?? null, v]);
}

export function TraceUploadForm({
  programs,
  programsMore,
  pickFile,
  onPreview,
  onSave,
  previewBusy,
  saveBusy,
  error,
  renderPreview,
  onRequestKey,
  initial,
}: TraceUploadFormProps) {
  const t = useTheme();
  const { isWide } = useBreakpoints();
  const [v, setV] = useState<UploadValues>(() => ({
    ...UPLOAD_DEFAULTS,
    ...initial,
    settings: { ...UPLOAD_DEFAULTS.settings, ...initial?.settings },
  }));
  const [file, setFile] = useState<TraceFile | null>(null);
  const [touched, setTouched] = useState<Set<string>>(new Set());
  const [showAll, setShowAll] = useState(false);
  const [pickError, setPickError] = useState<string | null>(null);

  const set = <K extends keyof UploadValues>(k: K, value: UploadValues[K]) => {
    setV((s) => ({ ...s, [k]: value }));
    setTouched((s) => new Set(s).add(k));
  };
  const setSetting = <K extends keyof SettingsValues>(k: K, value: SettingsValues[K]) => {
    setV((s) => ({ ...s, settings: { ...s.settings, [k]: value } }));
    setTouched((s) => new Set(s).add(`settings.${k}`));
  };

  const local = validateUpload(v, file);
  const valid = Object.keys(local).length === 0;
  const lines = uploadLines(error);
  const apiError = error instanceof ApiError ? error : null;
  const server = apiError ? uploadServerErrors(apiError.fields) : {};
  const err = (k: string) => (showAll || touched.has(k) ? local[k] : undefined) ?? server[k];
  // A settings error shows once its own field was touched (or on submit); server errors always.
  const settingsErrors: Record<string, string> = {};
  for (const k of new Set([...Object.keys(local), ...Object.keys(server)])) {
    if (!k.startsWith("settings.")) continue;
    const path = k.slice("settings.".length);
    const seen = showAll || touched.has(`settings.${SETTING_FIELD[path] ?? path}`);
    const m = (seen ? local[k] : undefined) ?? server[k];
    if (m) settingsErrors[path] = m;
  }

  const choose = async () => {
    setPickError(null);
    try {
      const f = await pickFile();
      if (f) {
        setFile(f);
        setTouched((s) => new Set(s).add("file"));
      }
    } catch (e) {
      setPickError(e instanceof Error ? e.message : "The file could not be opened.");
    }
  };
  const submit = (kind: "preview" | "save") => {
    setShowAll(true);
    if (!valid || !file) return;
    const req = { file, options: toUploadOptions(v) };
    if (kind === "preview") {
      onRequestKey?.(requestKey(file, v));
      onPreview(req);
    } else onSave(req);
  };
  const row = (children: React.ReactNode) => (
    <View style={{ flexDirection: isWide ? "row" : "column", gap: t.spacing.md, flexWrap: "wrap" }}>{children}</View>
  );
  // Side by side when wide; in a phone column a flex basis would become a height.
  const half = isWide ? ({ flexGrow: 1, flexBasis: 180 } as const) : undefined;
  // The message repeats the first listed problems, so it is shown only when there is no list.
  const otherError = apiError && !lines.length ? apiError.message : null;

  return (
    <View style={{ gap: t.spacing.lg }}>
      <Card>
        <Text variant="heading">File</Text>
        <Text variant="caption" tone="muted">
          CSV or TSV with a header line, up to 5 MB. Long layout: columns cell, time, value (and an input column); wide
          layout: a time column and one column per cell.
        </Text>
        <View style={{ flexDirection: "row", alignItems: "center", gap: t.spacing.md, flexWrap: "wrap" }}>
          <Button
            label={file ? "Choose another file" : "Choose a file"}
            icon="upload"
            variant="secondary"
            onPress={choose}
            testID="upload-pick-file"
          />
          <Text testID="upload-file-name" tone={file ? "default" : "muted"} style={{ flexShrink: 1 }}>
            {file ? `${file.name} (${fileSize(file.size)})` : "No file chosen"}
          </Text>
        </View>
        {err("file") || pickError ? (
          <Text variant="caption" tone="danger" role="alert" testID="upload-file-error">
            {err("file") ?? pickError}
          </Text>
        ) : null}
        <Field
          label="Name"
          value={v.name}
          onChangeText={(x) => set("name", x)}
          error={err("name")}
          hint="Optional; the file name is used when empty."
          testID="upload-name"
        />
      </Card>

      <Card>
        <Text variant="heading">How to read it</Text>
        <Choice
          label="Layout"
          testID="upload-layout"
          value={v.layout}
          options={[
            { value: "auto", label: "Detect" },
            { value: "long", label: "Long" },
            { value: "wide", label: "Wide" },
          ]}
          onChange={(x) => set("layout", x)}
        />
        <Choice
          label="Time unit in the file"
          testID="upload-time-unit"
          value={v.timeUnit}
          options={[
            { value: "s", label: "Seconds" },
            { value: "min", label: "Minutes" },
            { value: "h", label: "Hours" },
          ]}
          onChange={(x) => set("timeUnit", x)}
        />
        <Field
          label="Reporter channel"
          unit="optional"
          value={v.channel}
          onChangeText={(x) => set("channel", x)}
          error={err("channel")}
          hint="Only for long files with a channel column holding several channels."
          autoCapitalize="none"
          testID="upload-channel"
        />
      </Card>

      <Card>
        <Text variant="heading">Input schedule</Text>
        <Choice
          label="The inducer's on and off times come from"
          testID="upload-schedule-source"
          value={v.scheduleSource}
          options={[
            { value: "column", label: "A column of the file" },
            { value: "program", label: "An input program" },
          ]}
          onChange={(x) => set("scheduleSource", x)}
        />
        {v.scheduleSource === "column" ? (
          row(
            <>
              <Field
                label="Input column"
                value={v.scheduleColumn}
                onChangeText={(x) => set("scheduleColumn", x)}
                error={err("scheduleColumn")}
                autoCapitalize="none"
                testID="upload-schedule-column"
                style={half}
              />
              <Field
                label="ON above"
                unit="input level"
                value={v.onAbove}
                onChangeText={(x) => set("onAbove", x)}
                error={err("onAbove")}
                keyboardType="decimal-pad"
                testID="upload-on-above"
                style={half}
              />
            </>,
          )
        ) : programs.length ? (
          <>
            <Choice
              label="Input program"
              testID="upload-program"
              value={v.programId}
              options={programs.map((p) => ({ value: p.id, label: p.name }))}
              onChange={(x) => set("programId", x)}
            />
            {programsMore}
            {err("programId") ? (
              <Text variant="caption" tone="danger" role="alert">
                {err("programId")}
              </Text>
            ) : null}
            <Text variant="caption" tone="muted">
              Compiled over the time span of the traces; programs that draw a new schedule per replicate cannot be used.
            </Text>
          </>
        ) : (
          <Text tone="danger" role="alert">
            This lab has no input programs yet; use a column of the file.
          </Text>
        )}
      </Card>

      <Card>
        <Text variant="heading">Preprocessing and threshold</Text>
        <SettingsFields values={v.settings} errors={settingsErrors} onChange={setSetting} testIDPrefix="upload" />
      </Card>

      {lines.length ? <UploadProblems problems={lines} /> : null}
      {otherError ? (
        <Banner tone="danger" testID="upload-error">
          {otherError}
        </Banner>
      ) : null}
      {showAll && !valid ? (
        <Text tone="danger" role="alert" testID="upload-invalid">
          Some fields need attention (marked above).
        </Text>
      ) : null}

      <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm }}>
        <Button
          label="Preview"
          icon="eye"
          variant="secondary"
          busy={previewBusy}
          disabled={saveBusy}
          onPress={() => submit("preview")}
          testID="upload-preview"
        />
        <Button
          label="Save trace set"
          icon="save"
          busy={saveBusy}
          disabled={previewBusy}
          onPress={() => submit("save")}
          testID="upload-save"
        />
      </View>
      {renderPreview ? renderPreview(requestKey(file, v)) : null}
    </View>
  );
}
