/**
 * Stage-fate analysis of one dataset: the estimated matrix with the number of
 * individuals behind each column, every transition with its binomial interval,
 * fecundity and fertility with standard errors for the census timing chosen,
 * per-site and per-year λ, "start a life cycle from these estimates", and the
 * λ bootstrap Run.
 */
import { useState } from "react";
import { useNavigate } from "react-router";
import { type DatasetSummary, type FateAnalysisSettings, type FateGroup, type StageFateEstimate, useFateAnalysis, useStartLifeCycle } from "../../api/field-data";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { SelectField, TextField } from "../../components/ui/field";
import { Section } from "../../components/ui/layout";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { formatLambda, formatNumber } from "../../lib/number-format";
import { paths } from "../../routes/paths";
import { BootstrapPanel } from "./bootstrap-panel";

const f4 = (x: number | null | undefined) => formatNumber(x, 3);

function MatrixTable({ e }: { e: StageFateEstimate }) {
  const cell = (i: number, j: number) => {
    const u = e.U[i]![j]!;
    const f = e.F[i]![j]!;
    const zero = e.n[j]! > 0 && e.counts[i]![j] === 0 && f === 0;
    if (e.n[j] === 0 && f === 0) return <span className="font-bold text-ink underline decoration-ochre decoration-2" title="No individuals of this stage with a known fate">?</span>;
    return (
      <span className={zero ? "text-ink/60" : ""}>
        {f > 0 && u > 0 ? `${f4(u)} + ${f4(f)}` : f4(u + f)}
        {zero && <span className="ml-1 text-xs text-ink/75" title={`Never observed among ${e.n[j]} individuals`}>(0 of {e.n[j]})</span>}
      </span>
    );
  };
  return (
    <div className="overflow-x-auto">
      <table className="text-sm">
        <caption className="mb-1 text-left text-ink/75">
          Row: stage at the next census; column: stage now. Survival and growth u<sub>ij</sub> = n<sub>ij</sub>/n<sub>j</sub>, plus reproduction where shown “u + f”.
        </caption>
        <thead>
          <tr>
            <th scope="col" className="px-2 py-1 text-left">to ↓ / from →</th>
            {e.stages.map((s, j) => (
              <th key={s} scope="col" className="px-3 py-1 text-right">
                {s}
                <div className="font-normal text-ink/75 tabular-nums">n = {e.n[j]}</div>
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {e.stages.map((s, i) => (
            <tr key={s} className="border-t border-ink/10">
              <th scope="row" className="px-2 py-1 text-left">
                {s}
              </th>
              {e.stages.map((_, j) => (
                <td key={j} className="px-3 py-1 text-right tabular-nums">
                  {cell(i, j)}
                </td>
              ))}
            </tr>
          ))}
          <tr className="border-t border-ink/20">
            <th scope="row" className="px-2 py-1 text-left font-normal text-ink/75">
              died
            </th>
            {e.deaths.map((d, j) => (
              <td key={j} className="px-3 py-1 text-right text-ink/75 tabular-nums">
                {d}
              </td>
            ))}
          </tr>
        </tbody>
      </table>
    </div>
  );
}

function RatesTables({ e }: { e: StageFateEstimate }) {
  const method = e.method === "wilson" ? "Wilson" : "Clopper–Pearson";
  const level = `${Math.round(e.level * 100)} %`;
  return (
    <div className="grid gap-6 lg:grid-cols-2">
      <table className="text-sm">
        <caption className="mb-1 text-left font-bold">Survival and transitions ({level} {method} intervals)</caption>
        <thead className="text-left">
          <tr>
            <th scope="col" className="py-1 pr-3">From → to</th>
            <th scope="col" className="py-1 pr-3">k of n</th>
            <th scope="col" className="py-1 pr-3">Estimate ± SE</th>
            <th scope="col" className="py-1">Interval</th>
          </tr>
        </thead>
        <tbody>
          {e.survival.map((s) => (
            <tr key={`s${s.stage}`} className="border-t border-ink/10 tabular-nums">
              <td className="py-1 pr-3 font-bold">{e.stages[s.stage]} survives</td>
              <td className="py-1 pr-3">{s.n > 0 ? `${s.k} of ${s.n}` : "no data"}</td>
              <td className="py-1 pr-3">{s.p === null ? "—" : `${f4(s.p)} ± ${f4(s.se)}`}</td>
              <td className="py-1">{s.ci ? `${f4(s.ci.lower)}–${f4(s.ci.upper)}` : "—"}</td>
            </tr>
          ))}
          {e.transitions.map((t) => (
            <tr key={`${t.from}-${t.to}`} className={`border-t border-ink/10 tabular-nums ${t.zeroCount ? "text-ink/70" : ""}`}>
              <td className="py-1 pr-3">
                {e.stages[t.from]} → {e.stages[t.to]}
                {t.zeroCount && <span className="ml-2 rounded border border-ochre bg-ochre/15 px-1 text-xs font-bold text-ink">not observed</span>}
              </td>
              <td className="py-1 pr-3">
                {t.k} of {t.n}
              </td>
              <td className="py-1 pr-3">
                {f4(t.p)} ± {f4(t.se)}
              </td>
              <td className="py-1">{t.ci ? `${f4(t.ci.lower)}–${f4(t.ci.upper)}` : "—"}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <div className="space-y-4">
        <table className="text-sm">
          <caption className="mb-1 text-left font-bold">Offspring per individual</caption>
          <thead className="text-left">
            <tr>
              <th scope="col" className="py-1 pr-3">Stage</th>
              <th scope="col" className="py-1 pr-3">Records</th>
              <th scope="col" className="py-1">Mean ± SE</th>
            </tr>
          </thead>
          <tbody>
            {e.fecundity.map((f) => (
              <tr key={f.stage} className="border-t border-ink/10 tabular-nums">
                <td className="py-1 pr-3">{e.stages[f.stage]}</td>
                <td className="py-1 pr-3">{f.n}</td>
                <td className="py-1">{f.mean === null ? "none recorded" : `${f4(f.mean)}${f.se !== null ? ` ± ${f4(f.se)}` : ""}`}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <table className="text-sm">
          <caption className="mb-1 text-left font-bold">Fertility into {e.stages[e.newbornStage]} ({e.census} census)</caption>
          <tbody>
            {e.fertility.length === 0 && (
              <tr>
                <td className="py-1">No reproduction.</td>
              </tr>
            )}
            {e.fertility.map((f) => (
              <tr key={f.from} className="border-t border-ink/10 tabular-nums">
                <td className="py-1 pr-3">from {e.stages[f.from]}</td>
                <td className="py-1">
                  {f4(f.value)}
                  {f.se !== null && ` ± ${f4(f.se)} SE`}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="text-sm text-ink/75">
          {e.census === "pre-breeding"
            ? `Pre-breeding census: F = s₀ × mean offspring, with offspring survival to the first census s₀ = ${e.offspringSurvival}.`
            : "Post-breeding census: F = Σ (chance of surviving into stage i) × (mean offspring of stage i): parents must live to the next breeding."}
        </p>
      </div>
    </div>
  );
}

function GroupsTable({ groups, caption }: { groups: FateGroup[]; caption: string }) {
  if (groups.length === 0) return null;
  return (
    <table className="self-start text-sm">
      <caption className="mb-1 text-left font-bold">{caption}</caption>
      <thead className="text-left">
        <tr>
          <th scope="col" className="py-1 pr-4"></th>
          <th scope="col" className="py-1 pr-4">Records</th>
          <th scope="col" className="py-1 pr-4">λ</th>
          <th scope="col" className="py-1">Individuals with a known fate, by stage</th>
        </tr>
      </thead>
      <tbody>
        {groups.map((g) => {
          const thin = g.estimate.n.some((n) => n === 0);
          return (
            <tr key={g.label} className="border-t border-ink/10 tabular-nums">
              <th scope="row" className="py-1 pr-4 text-left">
                {g.label}
              </th>
              <td className="py-1 pr-4">{g.records}</td>
              <td className="py-1 pr-4">{g.estimate.lambda === null ? "—" : formatLambda(g.estimate.lambda)}</td>
              <td className="py-1">
                {g.estimate.n.join(" · ")}
                {thin && <span className="ml-2 text-xs font-bold text-ink">a stage has no data: λ is not comparable</span>}
              </td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

function StartLifeCycle({ dataset, settings }: { dataset: DatasetSummary; settings: FateAnalysisSettings }) {
  const [name, setName] = useState(`${dataset.name} — estimated`);
  const start = useStartLifeCycle(dataset.id, dataset.studyId);
  const navigate = useNavigate();
  return (
    <Section title="Start a life cycle from these estimates" description="A new life cycle in this Study: one stage per stage here, one named rate per observed transition and per stage's offspring, each with its standard error, interval, k of n and this dataset as source. Transitions never observed are left out and listed in its notes.">
      <form
        className="flex flex-wrap items-end gap-3"
        onSubmit={(ev) => {
          ev.preventDefault();
          start.mutate({ name, settings }, { onSuccess: (lc) => navigate(paths.lifeCycle(lc.id)) });
        }}
      >
        <TextField label="Life-cycle name" value={name} onChange={(e) => setName(e.target.value)} maxLength={200} fieldClassName="min-w-72" error={start.error?.message} />
        <Button type="submit" pending={start.isPending}>
          Start a life cycle
        </Button>
      </form>
    </Section>
  );
}

export function FatesView({ dataset, canEdit }: { dataset: DatasetSummary; canEdit: boolean }) {
  const [settings, setSettings] = useState<FateAnalysisSettings>({ census: "pre-breeding", offspringSurvival: 1, method: "wilson" });
  const [s0, setS0] = useState("1");
  const result = useFateAnalysis(dataset.id, settings);
  const s0Value = Number(s0.replace(",", "."));
  const s0Ok = s0.trim() !== "" && s0Value >= 0 && s0Value <= 1;
  const e = result.data?.pooled.estimate;

  return (
    <div className="space-y-4">
      <Section title="Matrix from stage fates" description="Each column's entries are the shares of that stage's individuals found in each stage at the next census (Caswell 2001 ch. 6). Small samples bias λ (Fiske, Bruna & Bolker 2008): mind the n under each column.">
        <div className="grid gap-3 sm:grid-cols-5">
          <SelectField label="Census timing" description={settings.census === "pre-breeding" ? "Breeding just after each census." : "Breeding just before each census."} value={settings.census} onChange={(ev) => setSettings((s) => ({ ...s, census: ev.target.value as FateAnalysisSettings["census"] }))}>
            <option value="pre-breeding">Pre-breeding</option>
            <option value="post-breeding">Post-breeding</option>
          </SelectField>
          {settings.census === "pre-breeding" && (
            <TextField
              label="Offspring survival to the first census"
              inputMode="decimal"
              value={s0}
              onChange={(ev) => {
                setS0(ev.target.value);
                const v = Number(ev.target.value.replace(",", "."));
                if (ev.target.value.trim() !== "" && v >= 0 && v <= 1) setSettings((s) => ({ ...s, offspringSurvival: v }));
              }}
              error={s0Ok ? undefined : "A proportion from 0 to 1."}
              description="1 when the offspring column counts young already seen at a census."
            />
          )}
          <SelectField label="Interval" value={settings.method} onChange={(ev) => setSettings((s) => ({ ...s, method: ev.target.value as FateAnalysisSettings["method"] }))}>
            <option value="wilson">Wilson score</option>
            <option value="clopper-pearson">Clopper–Pearson (exact)</option>
          </SelectField>
          {dataset.sites.length > 1 && (
            <SelectField label="Site" value={settings.site ?? ""} onChange={(ev) => setSettings((s) => ({ ...s, site: ev.target.value || undefined }))}>
              <option value="">All sites pooled</option>
              {dataset.sites.map((s) => (
                <option key={s} value={s}>
                  {s}
                </option>
              ))}
            </SelectField>
          )}
          {dataset.firstYear !== null && dataset.lastYear !== null && dataset.lastYear > dataset.firstYear && (
            <SelectField label="Years" value={settings.year === undefined ? "" : String(settings.year)} onChange={(ev) => setSettings((s) => ({ ...s, year: ev.target.value === "" ? undefined : Number(ev.target.value) }))}>
              <option value="">All years pooled</option>
              {Array.from({ length: Math.floor(dataset.lastYear) - Math.floor(dataset.firstYear) }, (_, k) => Math.floor(dataset.firstYear!) + k).map((y) => (
                <option key={y} value={y}>
                  {y} to {y + 1}
                </option>
              ))}
            </SelectField>
          )}
        </div>
      </Section>
      {result.isPending && <Loading label="Estimating…" />}
      {result.isError && <QueryError error={result.error} what="the estimates" onRetry={() => void result.refetch()} />}
      {e && result.data && (
        <>
          <Section title={`λ = ${e.lambda === null ? "—" : formatLambda(e.lambda)}`} description={`${result.data.pooled.records.toLocaleString("en")} records · ${result.data.pooled.label}`}>
            <div className="space-y-4">
              {e.notes.map((n, k) => (
                <Alert key={k} tone="warning" live={false}>
                  {n.message}
                </Alert>
              ))}
              <MatrixTable e={e} />
              <RatesTables e={e} />
              <div className="grid gap-6 lg:grid-cols-2">
                <GroupsTable groups={result.data.bySite} caption="By site" />
                <GroupsTable groups={result.data.byYear} caption="By year (census to the next)" />
              </div>
            </div>
          </Section>
          {canEdit && <StartLifeCycle dataset={dataset} settings={settings} />}
          <BootstrapPanel dataset={dataset} settings={settings} canEdit={canEdit} />
        </>
      )}
    </div>
  );
}
