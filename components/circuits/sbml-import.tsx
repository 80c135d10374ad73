/**
 * Bringing an SBML model in: choose a file or paste the text, let the server
 * read it (nothing is stored), look at what it understood or at the list of
 * parts it refuses (each with its line, id and reason), then save it as a new
 * circuit under a name of your choice.
 */
import React, { useState } from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Field } from "@/components/ui/field";
import { Button } from "@/components/ui/button";
import { Banner, ErrorState } from "@/components/ui/states";
import { Choice } from "@/components/ui/choice";
import { SBML_LIMITS, megabytes } from "@/shared/limits";
import { formatCount } from "@/shared/number-format";
import type { SbmlPreview, SbmlProblemWire } from "@/shared/schemas/api-sbml";
import type { SbmlFile, SbmlReading } from "@/components/data/sbml";

export type SbmlImportProps = {
  pickFile: () => Promise<SbmlFile | null>;
  onRead: (sbml: string) => void;
  /** A new circuit (name), or a new version of one of the lab's circuits (circuitId). */
  onSave: (req: { sbml: string; name?: string; circuitId?: string }) => void;
  /** The lab's circuits, for saving as a new version of one of them. */
  circuits?: { id: string; name: string }[];
  reading?: SbmlReading;
  readBusy?: boolean;
  saveBusy?: boolean;
  /** The last read or save error that is not a refusal report. */
  error?: unknown;
};

const byteLength = (s: string) => new TextEncoder().encode(s).length;

export function SbmlImport({
  pickFile,
  onRead,
  onSave,
  reading,
  readBusy,
  saveBusy,
  error,
  circuits = [],
}: SbmlImportProps) {
  const t = useTheme();
  const [file, setFile] = useState<SbmlFile | null>(null);
  const [pasted, setPasted] = useState("");
  const [readText, setReadText] = useState<string | null>(null);
  const [name, setName] = useState<string | null>(null);
  const [localError, setLocalError] = useState<string | null>(null);
  const source = file ? file.text : pasted;

  const read = () => {
    setLocalError(null);
    if (!source.trim()) {
      setLocalError("Choose a file or paste the SBML text first.");
      return;
    }
    if (byteLength(source) > SBML_LIMITS.maxSbmlBytes) {
      setLocalError(`This document is larger than ${megabytes(SBML_LIMITS.maxSbmlBytes)}, the most Linger reads.`);
      return;
    }
    setReadText(source);
    onRead(source);
  };
  const stale = reading !== undefined && readText !== source;
  const preview = reading?.kind === "preview" && !stale ? reading.preview : null;
  const refused = reading?.kind === "refused" && !stale ? reading : null;

  return (
    <View style={{ gap: t.spacing.lg }}>
      <Card>
        <Text variant="heading">The model</Text>
        <Text tone="muted">
          An SBML Level 3 document (Version 1 or 2; Level 2 Version 4 also works), at most{" "}
          {megabytes(SBML_LIMITS.maxSbmlBytes)}. Linger reads it first and shows what it understood; nothing is kept
          until you save.
        </Text>
        <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm, alignItems: "center" }}>
          <Button
            label={file ? "Choose another file" : "Choose a file"}
            icon="file"
            variant="secondary"
            testID="sbml-pick-file"
            onPress={async () => {
              const f = await pickFile();
              if (f) {
                setFile(f);
                setLocalError(null);
              }
            }}
          />
          {file ? (
            <View testID="sbml-file-name" style={{ flexDirection: "row", gap: t.spacing.sm, alignItems: "center" }}>
              <Text variant="bodyStrong">{file.name}</Text>
              <Button label="Use pasted text instead" variant="ghost" compact onPress={() => setFile(null)} />
            </View>
          ) : null}
        </View>
        {!file ? (
          <Field
            label="Or paste the SBML text"
            value={pasted}
            onChangeText={setPasted}
            multiline
            autoCapitalize="none"
            placeholder='<?xml version="1.0" encoding="UTF-8"?> ...'
            testID="sbml-paste"
            style={{ minHeight: 120 }}
          />
        ) : null}
        {localError ? <Banner tone="danger">{localError}</Banner> : null}
        <Button
          label="Read the model"
          icon="eye"
          busy={readBusy}
          onPress={read}
          testID="sbml-read"
          style={{ alignSelf: "flex-start" }}
        />
      </Card>

      {stale ? (
        <Banner tone="notice">The text changed since it was read. Read it again to see what it gives.</Banner>
      ) : null}
      {refused ? <RefusalReport message={refused.message} problems={refused.problems} /> : null}
      {preview ? (
        <PreviewCard
          preview={preview}
          name={name ?? preview.circuit.name}
          onName={setName}
          saveBusy={saveBusy}
          circuits={circuits}
          onSave={(target) =>
            onSave(
              target
                ? { sbml: readText!, circuitId: target }
                : { sbml: readText!, name: (name ?? preview.circuit.name).trim() },
            )
          }
        />
      ) : null}
      {error ? <ErrorState title="That did not work" error={error} /> : null}
    </View>
  );
}

function RefusalReport({ message, problems }: { message: string; problems: SbmlProblemWire[] }) {
  const t = useTheme();
  return (
    <Card testID="sbml-refusals">
      <Text variant="heading">Parts Linger cannot take</Text>
      <Text tone="muted">{message}</Text>
      <View style={{ gap: t.spacing.sm }}>
        {[...problems]
          .sort((a, b) => a.line - b.line)
          .map((p, i) => (
            <View key={i} testID="sbml-refusal" style={{ gap: 2 }}>
              <Text variant="bodyStrong">
                Line {p.line}: {p.element}
                {p.id ? ` "${p.id}"` : ""}
              </Text>
              <Text>{p.reason}</Text>
            </View>
          ))}
      </View>
      <Text variant="caption" tone="muted">
        Change or remove these parts in the file (for example, write a rate rule as reactions) and read it again.
      </Text>
    </Card>
  );
}

function Section({ title, count, children }: { title: string; count: number; children: React.ReactNode }) {
  const t = useTheme();
  if (count === 0) return null;
  return (
    <View style={{ gap: t.spacing.xs }}>
      <Text variant="label">
        {title} ({count})
      </Text>
      {children}
    </View>
  );
}

function PreviewCard({
  preview,
  name,
  onName,
  onSave,
  saveBusy,
  circuits,
}: {
  preview: SbmlPreview;
  name: string;
  onName: (s: string) => void;
  /** undefined: a new circuit; an id: a new version of that circuit. */
  onSave: (circuitId?: string) => void;
  saveBusy?: boolean;
  circuits: { id: string; name: string }[];
}) {
  const c = preview.circuit;
  const [as, setAs] = useState<"new" | "version">("new");
  const [target, setTarget] = useState<string | null>(null);
  return (
    <Card testID="sbml-preview">
      <Text variant="heading">What Linger read</Text>
      <Text tone="muted">
        SBML Level {preview.level} Version {preview.version}: {c.species.length} species, {c.reactions.length}{" "}
        reactions. Amounts are molecule counts and rates are per minute (the model&apos;s time unit is read as minutes).
      </Text>
      {preview.notes.map((n, i) => (
        <Banner key={i} tone="notice">
          {n}
        </Banner>
      ))}
      <Section title="Species and starting counts" count={c.species.length}>
        {c.species.map((s) => (
          <Text key={s.name} testID="sbml-species">
            {s.name}: {formatCount(s.initialCount)}
          </Text>
        ))}
      </Section>
      <Section title="Reactions" count={preview.reactions.length}>
        {preview.reactions.map((r) => (
          <View key={r.name} testID="sbml-reaction">
            <Text variant="bodyStrong">
              {r.name}: {r.scheme}
            </Text>
            <Text variant="caption" tone="muted">
              {r.rate}
            </Text>
          </View>
        ))}
      </Section>
      <Section title="Parameters" count={c.parameters?.length ?? 0}>
        {(c.parameters ?? []).map((p) => (
          <Text key={p.name} testID="sbml-parameter">
            {p.name} = {p.value}
          </Text>
        ))}
      </Section>
      <Section title="Events" count={c.events?.length ?? 0}>
        {(c.events ?? []).map((e) => (
          <Text key={e.name}>
            {e.name}: {e.when ? `when ${e.when}` : `at ${e.at?.join(", ")} min`}, sets{" "}
            {e.assign.map((a) => `${a.target} = ${a.value}`).join("; ")}
          </Text>
        ))}
      </Section>
      <Section title="Assignment rules" count={c.rules?.length ?? 0}>
        {(c.rules ?? []).map((r) => (
          <Text key={r.target}>
            {r.target} = {r.value}
          </Text>
        ))}
      </Section>
      <Section title="Compartments (their sizes enter the rates as numbers)" count={preview.compartments.length}>
        {preview.compartments.map((x) => (
          <Text key={x.id}>
            {x.id}: size {x.size}
          </Text>
        ))}
      </Section>
      <Text variant="caption" tone="muted">
        The reporter (output) is {c.outputSpecies}; you can change it after saving. Results of an imported model are
        only as good as the model: they do not replace measurements.
      </Text>
      {circuits.length > 0 ? (
        <Choice
          label="Keep it as"
          value={as}
          options={[
            { value: "new", label: "A new circuit" },
            { value: "version", label: "A new version of a circuit" },
          ]}
          onChange={setAs}
          testID="sbml-save-as"
        />
      ) : null}
      {as === "new" || circuits.length === 0 ? (
        <>
          <Field label="Circuit name" value={name} onChangeText={onName} testID="sbml-name" />
          <Button
            label="Save as new circuit"
            icon="save"
            busy={saveBusy}
            disabled={!name.trim()}
            onPress={() => onSave()}
            testID="sbml-save"
            style={{ alignSelf: "flex-start" }}
          />
        </>
      ) : (
        <>
          <Choice
            label="Circuit that gets the new version"
            value={target ?? ""}
            options={circuits.map((x) => ({ value: x.id, label: x.name }))}
            onChange={setTarget}
            testID="sbml-target"
          />
          <Text variant="caption" tone="muted">
            Its earlier versions stay as they are; runs keep the version they used.
          </Text>
          <Button
            label="Save as new version"
            icon="save"
            busy={saveBusy}
            disabled={!target}
            onPress={() => onSave(target!)}
            testID="sbml-save-version"
            style={{ alignSelf: "flex-start" }}
          />
        </>
      )}
    </Card>
  );
}
