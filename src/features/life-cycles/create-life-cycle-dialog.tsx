/**
 * Start a life cycle from a template, from a projection matrix in CSV, or
 * from a Stagewright life-cycle file. The document is built here with the
 * shared helpers and posted whole; a problem with the input is shown next to
 * it and nothing is saved.
 */
import { Tab, TabGroup, TabList, TabPanel, TabPanels } from "@headlessui/react";
import { type FormEvent, useId, useMemo, useState } from "react";
import { ZodError } from "zod";
import {
  CENSUS_TIMINGS,
  type Census,
  type LifeCycle,
  LifeCycleUpgradeError,
  MAX_NAME_LENGTH,
  MAX_STAGES,
  ageClassTemplate,
  lifeCycleFromMatrix,
  parseMatrixCsv,
  stageTemplate,
  upgradeLifeCycle,
} from "../../../shared/lifecycle";
import { type LifeCycleRecord, useCreateLifeCycle } from "../../api/life-cycles";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { Dialog } from "../../components/ui/dialog";
import { SelectField, TextAreaField, TextField } from "../../components/ui/field";

type DialogProps = {
  studyId: string;
  open: boolean;
  onClose: () => void;
  onCreated: (record: LifeCycleRecord) => void;
};

const CENSUS_LABELS: Record<Census, string> = {
  "pre-breeding": "Pre-breeding census",
  "post-breeding": "Post-breeding census",
};

const tabClasses = ({ selected }: { selected: boolean }) =>
  `rounded-md px-3 py-1.5 text-sm font-bold ${selected ? "bg-indigo text-white" : "bg-ink/5 text-ink hover:bg-ink/10"}`;

export function CreateLifeCycleDialog({ studyId, open, onClose, onCreated }: DialogProps) {
  const create = useCreateLifeCycle(studyId);
  const submit = (document: LifeCycle) => create.mutate({ document }, { onSuccess: onCreated });
  const common = { pending: create.isPending, onSubmit: submit };

  return (
    <Dialog open={open} onClose={onClose} title="New life cycle" description="Start from a ready-made structure, a projection matrix, or a Stagewright file.">
      <TabGroup>
        <TabList aria-label="How to start" className="flex flex-wrap gap-2">
          <Tab className={tabClasses}>Template</Tab>
          <Tab className={tabClasses}>Matrix (CSV)</Tab>
          <Tab className={tabClasses}>Stagewright file</Tab>
        </TabList>
        <TabPanels className="mt-4">
          <TabPanel>
            <TemplateForm {...common} />
          </TabPanel>
          <TabPanel>
            <MatrixForm {...common} />
          </TabPanel>
          <TabPanel>
            <FileForm {...common} />
          </TabPanel>
        </TabPanels>
      </TabGroup>
      {create.isError && (
        <Alert tone="error" className="mt-3" title="The life cycle was not created.">
          {create.error.message}
        </Alert>
      )}
      <div className="mt-4 flex justify-end">
        <Button variant="secondary" onClick={onClose}>
          Cancel
        </Button>
      </div>
    </Dialog>
  );
}

type FormProps = { pending: boolean; onSubmit: (document: LifeCycle) => void };

function nameProblem(name: string): string | undefined {
  if (name.trim().length > MAX_NAME_LENGTH) return `A name has at most ${MAX_NAME_LENGTH} characters.`;
  return undefined;
}

function countProblem(text: string): string | undefined {
  if (!/^\d+$/.test(text.trim())) return `Give a whole number from 1 to ${MAX_STAGES}.`;
  const k = Number(text);
  if (k < 1 || k > MAX_STAGES) return `Give a whole number from 1 to ${MAX_STAGES}.`;
  return undefined;
}

// ------------------------------------------------------------------ template

function TemplateForm({ pending, onSubmit }: FormProps) {
  const [structure, setStructure] = useState<"age" | "stage">("stage");
  const [count, setCount] = useState("3");
  const [census, setCensus] = useState<Census>("pre-breeding");
  const [lastClassStays, setLastClassStays] = useState(false);
  const [name, setName] = useState("");
  const [touched, setTouched] = useState(false);
  const countError = countProblem(count);
  const nameError = nameProblem(name);

  const handle = (event: FormEvent) => {
    event.preventDefault();
    setTouched(true);
    if (countError || nameError) return;
    const k = Number(count);
    const options = { census, ...(name.trim() ? { name: name.trim() } : {}) };
    onSubmit(structure === "age" ? ageClassTemplate(k, { ...options, lastClassStasis: lastClassStays }) : stageTemplate(k, options));
  };

  return (
    <form onSubmit={handle} className="space-y-3" noValidate>
      <fieldset className="space-y-1">
        <legend className="font-bold">Structure</legend>
        <label className="flex items-start gap-2">
          <input type="radio" name="structure" className="mt-1 accent-indigo" checked={structure === "stage"} onChange={() => setStructure("stage")} />
          <span>
            Stages with stasis and growth
            <span className="block text-sm text-ink/75">Each stage stays or grows into the next; the last stage reproduces into the first.</span>
          </span>
        </label>
        <label className="flex items-start gap-2">
          <input type="radio" name="structure" className="mt-1 accent-indigo" checked={structure === "age"} onChange={() => setStructure("age")} />
          <span>
            Age classes
            <span className="block text-sm text-ink/75">Each class survives into the next and every class may reproduce into the first.</span>
          </span>
        </label>
      </fieldset>
      <TextField
        label={structure === "age" ? "Number of age classes" : "Number of stages"}
        inputMode="numeric"
        value={count}
        onChange={(event) => setCount(event.target.value)}
        error={touched || count !== "" ? countError : undefined}
      />
      {structure === "age" && (
        <label className="flex items-center gap-2">
          <input type="checkbox" className="size-4 accent-indigo" checked={lastClassStays} onChange={(event) => setLastClassStays(event.target.checked)} />
          The last class survives into itself (an “and older” class)
        </label>
      )}
      <SelectField label="Census" value={census} onChange={(event) => setCensus(event.target.value as Census)}>
        {CENSUS_TIMINGS.map((c) => (
          <option key={c} value={c}>
            {CENSUS_LABELS[c]}
          </option>
        ))}
      </SelectField>
      <TextField label="Name (optional)" value={name} onChange={(event) => setName(event.target.value)} error={nameError} />
      <p className="text-sm text-ink/80">Every arrow gets a named vital rate set to 0; fill in the values on the Rates tab.</p>
      <Button type="submit" pending={pending}>
        Create from template
      </Button>
    </form>
  );
}

// -------------------------------------------------------------------- matrix

function splitNames(text: string): string[] {
  return text
    .split(/[\n,;\t]/)
    .map((s) => s.trim())
    .filter((s) => s !== "");
}

type MatrixReading =
  | { ok: true; matrix: number[][]; stageNames: string[] | null; note: string }
  | { ok: false; problems: string[] }
  | null;

function readMatrix(csv: string, namesText: string): MatrixReading {
  if (csv.trim() === "") return null;
  const parsed = parseMatrixCsv(csv);
  if (!parsed.ok) return { ok: false, problems: parsed.issues.map((i) => `Line ${i.line}${i.column ? `, cell ${i.column}` : ""}: ${i.message}`) };
  const n = parsed.matrix.length;
  const typed = splitNames(namesText);
  if (typed.length > 0 && typed.length !== n) return { ok: false, problems: [`The matrix has ${n} stages but ${typed.length} stage names are given; give ${n} names or none.`] };
  const stageNames = typed.length > 0 ? typed : parsed.stageNames;
  if (stageNames) {
    const seen = new Set<string>();
    for (const s of stageNames) {
      if (seen.has(s)) return { ok: false, problems: [`Two stages are named “${s}”; stage names must differ.`] };
      seen.add(s);
    }
  }
  const nonZero = parsed.matrix.flat().filter((v) => v > 0).length;
  return {
    ok: true,
    matrix: parsed.matrix,
    stageNames,
    note: `Reads as a ${n} × ${n} matrix with ${nonZero} non-zero ${nonZero === 1 ? "entry" : "entries"}${stageNames ? `; stages ${stageNames.join(", ")}` : ""}.`,
  };
}

function MatrixForm({ pending, onSubmit }: FormProps) {
  const [csv, setCsv] = useState("");
  const [names, setNames] = useState("");
  const [firstRowReproduction, setFirstRowReproduction] = useState(false);
  const [name, setName] = useState("");
  const [fileError, setFileError] = useState<string | null>(null);
  const [buildError, setBuildError] = useState<string | null>(null);
  const reading = useMemo(() => readMatrix(csv, names), [csv, names]);
  const fileId = useId();
  const nameError = nameProblem(name);

  const handle = (event: FormEvent) => {
    event.preventDefault();
    if (!reading?.ok || nameError) return;
    try {
      onSubmit(
        lifeCycleFromMatrix(reading.matrix, reading.stageNames ?? undefined, {
          ...(name.trim() ? { name: name.trim() } : {}),
          ...(firstRowReproduction ? { reproductionRows: [0] } : {}),
        }),
      );
      setBuildError(null);
    } catch (error) {
      setBuildError(describeDocumentError(error));
    }
  };

  return (
    <form onSubmit={handle} className="space-y-3" noValidate>
      <TextAreaField
        label="Projection matrix (CSV)"
        rows={6}
        className="font-mono text-sm"
        value={csv}
        onChange={(event) => setCsv(event.target.value)}
        placeholder={",Juvenile,Adult\nJuvenile,0,1.8\nAdult,0.35,0.8"}
        description="Paste a square matrix: rows are the stage at the next census, columns the stage now. Stage names on a header row or first column are optional."
        error={reading && !reading.ok ? reading.problems.slice(0, 8).join(" ") : undefined}
        spellCheck={false}
      />
      <div className="space-y-1">
        <label htmlFor={fileId} className="block font-bold">
          Or choose a CSV file
        </label>
        <input
          id={fileId}
          type="file"
          accept=".csv,.tsv,.txt,text/csv,text/plain"
          className="block text-sm"
          onChange={async (event) => {
            const file = event.target.files?.[0];
            if (!file) return;
            if (file.size > 5_000_000) return setFileError("That file is larger than 5 MB; a matrix of 500 stages fits well within that.");
            setFileError(null);
            setCsv(await file.text());
          }}
        />
        {fileError && <p className="text-sm font-bold text-brick">{fileError}</p>}
      </div>
      <TextAreaField
        label="Stage names (optional)"
        rows={2}
        value={names}
        onChange={(event) => setNames(event.target.value)}
        description="One per line or separated by commas, in matrix order. They replace names found in the CSV."
      />
      <label className="flex items-start gap-2">
        <input type="checkbox" className="mt-1 size-4 accent-indigo" checked={firstRowReproduction} onChange={(event) => setFirstRowReproduction(event.target.checked)} />
        <span>
          The first row is reproduction
          <span className="block text-sm text-ink/75">As in an age-classified matrix. Otherwise every entry becomes a survival arrow; change kinds later in the Diagram.</span>
        </span>
      </label>
      <TextField label="Name (optional)" value={name} onChange={(event) => setName(event.target.value)} error={nameError} />
      {reading?.ok && (
        <p role="status" className="text-sm">
          <span aria-hidden="true" className="text-spruce">
            ✓{" "}
          </span>
          {reading.note}
        </p>
      )}
      {buildError && (
        <p role="alert" className="text-sm font-bold text-brick">
          {buildError}
        </p>
      )}
      <Button type="submit" pending={pending} disabled={!reading?.ok}>
        Create from matrix
      </Button>
    </form>
  );
}

// ---------------------------------------------------------------------- file

/** A readable reason a document cannot be used: the format version, or the first problems with their places. */
function describeDocumentError(error: unknown): string {
  if (error instanceof LifeCycleUpgradeError) return error.message;
  if (error instanceof ZodError) {
    const issues = error.issues.slice(0, 5).map((i) => (i.path.length ? `${i.path.join(".")}: ${i.message}` : i.message));
    const more = error.issues.length > 5 ? ` (and ${error.issues.length - 5} more)` : "";
    return `This file is not a valid Stagewright life cycle. ${issues.join(" ")}${more}`;
  }
  if (error instanceof SyntaxError) return `This file is not valid JSON: ${error.message}`;
  return error instanceof Error ? error.message : "This file cannot be read.";
}

function FileForm({ pending, onSubmit }: FormProps) {
  const [document, setDocument] = useState<LifeCycle | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const fileId = useId();

  return (
    <form
      className="space-y-3"
      noValidate
      onSubmit={(event) => {
        event.preventDefault();
        if (document) onSubmit(document);
      }}
    >
      <div className="space-y-1">
        <label htmlFor={fileId} className="block font-bold">
          Stagewright life-cycle file (.json)
        </label>
        <input
          id={fileId}
          type="file"
          accept=".json,application/json"
          className="block text-sm"
          aria-invalid={problem ? true : undefined}
          aria-describedby={problem ? `${fileId}-error` : `${fileId}-description`}
          onChange={async (event) => {
            const file = event.target.files?.[0];
            setDocument(null);
            setProblem(null);
            if (!file) return;
            if (file.size > 20_000_000) return setProblem("That file is larger than 20 MB, more than any life cycle needs.");
            try {
              setDocument(upgradeLifeCycle(JSON.parse(await file.text())));
            } catch (error) {
              setProblem(describeDocumentError(error));
            }
          }}
        />
        <p id={`${fileId}-description`} className="text-sm text-ink/75">
          A file exported from Stagewright (its “stagewright” field names the format version; older versions are brought up to date).
        </p>
        {problem && (
          <p id={`${fileId}-error`} className="text-sm font-bold text-brick">
            <span aria-hidden="true">✕ </span>
            {problem}
          </p>
        )}
      </div>
      {document && (
        <p role="status" className="text-sm">
          <span aria-hidden="true" className="text-spruce">
            ✓{" "}
          </span>
          “{document.name}”: {document.stages.length} stages, {document.transitions.length} arrows, {document.rates.length} vital rates.
        </p>
      )}
      <Button type="submit" pending={pending} disabled={!document}>
        Create from file
      </Button>
    </form>
  );
}
