/**
 * A life cycle's report laid out for reading and printing: the same object
 * the server draws into the PDF (shared/report/model.ts), so page and PDF say
 * the same. Figures are the server's SVGs, shown as images.
 */
import type { ReactNode } from "react";
import { formatLambda, formatNumber, formatPercent } from "../../../shared/format/number-format";
import { censusNote } from "../../../shared/format/verdict";
import type { LifeCycleReport } from "../../../shared/report/model";
import {
  climateFindings,
  dateText,
  describeSource,
  lambdaIntervalText,
  lambdaRunText,
  leverRows,
  reviewRows,
  reviewStatusText,
  scenarioRows,
  slopeRows,
  thermalNotes,
  thermalResponseRows,
  uncertaintyText,
  warmingLines,
} from "../../../shared/report/text";

const svgSrc = (svg: string) => `data:image/svg+xml;charset=utf-8,${encodeURIComponent(svg)}`;

function Block({ title, children, id }: { title: string; children: ReactNode; id?: string }) {
  return (
    <section aria-labelledby={id} className="report-block space-y-2">
      <h2 id={id} className="border-b border-spruce/40 pb-1 text-lg font-bold text-spruce">
        {title}
      </h2>
      {children}
    </section>
  );
}

function Figure({ svg, alt, caption }: { svg: string; alt: string; caption: string }) {
  return (
    <figure className="report-figure space-y-1">
      <img src={svgSrc(svg)} alt={alt} className="mx-auto max-h-[26rem] max-w-full" />
      <figcaption className="text-center text-xs text-ink/75">{caption}</figcaption>
    </figure>
  );
}

const tableOf = (t: { header: string[]; rows: string[][] }) => ({ header: t.header, rows: t.rows });

function Table({ caption, header, rows, small }: { caption: string; header: string[]; rows: ReactNode[][]; small?: boolean }) {
  return (
    <div className="overflow-x-auto">
      <table className={`w-full border-collapse ${small ? "text-xs" : "text-sm"}`}>
        <caption className="sr-only">{caption}</caption>
        <thead>
          <tr className="bg-ink/5">
            {header.map((h, i) => (
              <th key={i} scope="col" className="border-b border-ink/30 px-2 py-1 text-left font-bold">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((r, i) => (
            <tr key={i} className="border-b border-ink/10">
              {r.map((c, j) =>
                j === 0 ? (
                  <th key={j} scope="row" className="px-2 py-1 text-left font-bold">
                    {c}
                  </th>
                ) : (
                  <td key={j} className="px-2 py-1 tabular-nums">
                    {c}
                  </td>
                ),
              )}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function Cautions({ cautions }: { cautions: readonly string[] }) {
  return (
    <aside aria-label="Cautions" className="rounded-md border-2 border-ochre bg-ochre/5 px-4 py-2 text-sm">
      {cautions.join(" ")}
    </aside>
  );
}

/** Climate: the thermal responses, λ(T) with its persistence window, dλ/dT by rate, the warming Run and the cautions that apply. */
function ClimateBlock({ report: r }: { report: LifeCycleReport }) {
  const c = r.climate!;
  const [intro, ...findings] = climateFindings(c, r.analysis?.lambda ?? null, r.document.timeStepUnit);
  const slope = slopeRows(c);
  return (
    <Block title="Climate" id="report-climate">
      <p>{intro}</p>
      <Table caption="Thermal responses of the vital rates" small {...tableOf(thermalResponseRows(c))} />
      <ul className="space-y-0.5 text-xs text-ink/75">
        {thermalNotes(c).map((n) => (
          <li key={n}>{n}</li>
        ))}
      </ul>
      <div data-testid="report-climate-findings" className="space-y-1">
        {findings.map((line) => (
          <p key={line}>{line}</p>
        ))}
      </div>
      {r.figures.climate && (
        <Figure
          svg={r.figures.climate}
          alt={`Line chart of λ from ${c.range.min} to ${c.range.max} °C, with the persistence window (λ ≥ 1) shaded and its edges marked.`}
          caption="λ over temperature; the shaded band is the persistence window (λ ≥ 1), its edges marked in °C; dashed: λ = 1; the dot marks the highest λ."
        />
      )}
      {slope && (
        <>
          <p>Where the slope comes from: each responding rate’s part (∂λ/∂rate)·(d rate/dT).</p>
          <Table caption="dλ/dT split by rate" small {...tableOf(slope)} />
        </>
      )}
      {c.warming && (
        <section aria-labelledby="report-warming" className="space-y-2">
          <h3 id="report-warming" className="font-bold">
            Warming trajectory
          </h3>
          {warmingLines(c.warming).map((line) => (
            <p key={line}>{line}</p>
          ))}
          {r.figures.warming && (
            <Figure
              svg={r.figures.warming}
              alt="Line chart of the total population by year under the warming trajectory: without noise, and the replicates' median with their 5 % and 95 %."
              caption="Total population under the warming trajectory: without year-to-year noise (ink), and the median (green) with 5 % and 95 % (dashed) of the replicates."
            />
          )}
        </section>
      )}
      <section aria-labelledby="report-climate-cautions" className="space-y-1">
        <h3 id="report-climate-cautions" className="font-bold">
          Cautions for these Climate results
        </h3>
        <ul className="list-disc space-y-1 pl-5 text-sm">
          {c.cautions.map((line) => (
            <li key={line}>{line}</li>
          ))}
        </ul>
      </section>
    </Block>
  );
}

export function ReportDocument({ report: r }: { report: LifeCycleReport }) {
  const a = r.analysis;
  const unit = r.document.timeStepUnit;
  const names = r.document.stages.map((s) => s.name);
  const lh = a?.lifeHistory ?? null;
  const why = (field: string) => a?.nullReasons[field] ?? "not available";

  return (
    <article className="report mx-auto max-w-4xl space-y-6 bg-white p-8 shadow-sm print:max-w-none print:p-0 print:shadow-none" aria-labelledby="report-title">
      <header className="space-y-1">
        <p className="text-sm text-ink/70">Stagewright report</p>
        <h1 id="report-title" className="text-3xl font-bold">
          {r.lifeCycle.name}
        </h1>
        <p>Study: {r.study.name}</p>
        <p data-testid="report-source">{describeSource(r)}</p>
        <p>Authors: {r.authors.length ? r.authors.join(", ") : "—"}</p>
        <p className="text-sm text-ink/70">
          Census: {r.document.census}; time step: one {unit}. Generated {dateText(r.generatedAt)}.
        </p>
      </header>
      <Cautions cautions={r.cautions} />

      <Block title="Growth rate λ" id="report-lambda">
        {a && a.lambda !== null ? (
          <>
            <p className="text-2xl font-bold" data-testid="report-lambda">
              λ = {formatLambda(a.lambda)}
            </p>
            {r.verdict && (
              <p>
                The population is {r.verdict.headline} once its stage structure has settled.{r.verdict.detail ? ` ${r.verdict.detail}` : ""}
              </p>
            )}
            {lambdaIntervalText(a) ? (
              <p data-testid="report-lambda-interval">{lambdaIntervalText(a)}</p>
            ) : (
              <p className="text-sm text-ink/75">No interval for λ: no vital rate carries an SE, a CI or counts. A Risk run shows the effect of variation over time.</p>
            )}
            {lambdaRunText(r) && <p data-testid="report-lambda-run">{lambdaRunText(r)}</p>}
            <p className="text-sm text-ink/75">{censusNote(r.document.census)}</p>
          </>
        ) : (
          <p className="font-bold text-brick">λ cannot be computed: {r.analysisProblem ?? why("lambda")}</p>
        )}
      </Block>

      <Block title="Life-cycle diagram" id="report-diagram">
        <Figure
          svg={r.figures.diagram}
          alt={`Life-cycle diagram of ${r.lifeCycle.name}: ${names.length} stages and ${r.document.transitions.length} arrows.`}
          caption="Stages (with their stable-stage share and reproductive value) and arrows: survival and growth solid green, reproduction dashed clay, each labelled with its rate."
        />
      </Block>

      <Block title="Stages" id="report-stages">
        <Table
          caption="Stages with stable share, reproductive value and life expectancy"
          header={["Stage", "Stable share w", "Reproductive value v", `Life expectancy (${unit}s)`]}
          rows={names.map((n, i) => [n, a?.stableStage ? formatPercent(a.stableStage[i]!) : "—", a?.reproductiveValue ? formatNumber(a.reproductiveValue[i]) : "—", lh ? formatNumber(lh.lifeExpectancy[i]) : "—"])}
        />
      </Block>

      <Block title="Vital rates" id="report-rates">
        {r.document.rates.length === 0 ? (
          <p>The arrows carry numbers; no named vital rates.</p>
        ) : (
          <Table
            caption="Vital rates with uncertainty and sources"
            header={["Rate", "Value", "Uncertainty", "Unit", "Source", ...(a ? ["Elasticity of λ"] : [])]}
            rows={r.document.rates.map((rate) => {
              const e = a?.vitalRates.find((v) => v.name === rate.name);
              return [rate.name, formatNumber(rate.value), uncertaintyText(rate), rate.unit ?? "—", rate.source ?? "—", ...(a ? [e ? formatNumber(e.elasticity, 3) : "—"] : [])];
            })}
          />
        )}
      </Block>

      <Block title="Projection matrix A" id="report-matrix">
        {a ? (
          <>
            <p className="text-sm text-ink/75">Rows: stage at t+1; columns: stage at t.</p>
            <Table caption="Projection matrix A" small={names.length > 8} header={["to \\ from", ...names]} rows={a.matrices.A.map((row, i) => [names[i], ...row.map((v) => (v === 0 ? "0" : formatNumber(v)))])} />
          </>
        ) : (
          <p>The matrix cannot be built until every rate can be computed.</p>
        )}
      </Block>

      {r.figures.elasticity && (
        <Block title="Elasticities" id="report-elasticity">
          <p>Each cell is the share of λ’s response to a proportional change in that matrix entry; they sum to 1. Darker cells are stronger levers.</p>
          <Figure svg={r.figures.elasticity} alt="Heatmap of the elasticities of λ to each matrix entry." caption="Elasticity e_ij = (a_ij/λ) ∂λ/∂a_ij; rows: stage at t+1, columns: stage at t." />
        </Block>
      )}
      {r.figures.stageVectors && (
        <Block title="Stable stage distribution and reproductive values" id="report-vectors">
          <Figure svg={r.figures.stageVectors} alt="Bar chart of the stable stage distribution and the reproductive values." caption="w: share of each stage once the structure has settled; v: each stage’s worth to future growth." />
        </Block>
      )}

      {a && (
        <>
          <Block title="Life history and convergence" id="report-life-history">
            <Table
              caption="Life-history measures"
              header={["Measure", "Value"]}
              rows={[
                ["Net reproductive rate R0 (offspring per lifetime)", lh ? formatNumber(lh.netReproductiveRate) : why("lifeHistory")],
                [`Generation time ln R0 / ln λ (${unit}s)`, lh?.generationTimeR0 != null ? formatNumber(lh.generationTimeR0) : (lh?.nullReasons.generationTimeR0 ?? why("lifeHistory"))],
                [`Mean age of parents (${unit}s)`, lh?.meanAgeOfParents != null ? formatNumber(lh.meanAgeOfParents) : (lh?.nullReasons.meanAgeOfParents ?? why("lifeHistory"))],
                ["Damping ratio ρ = λ/|λ₂|", a.dampingRatio !== null ? formatNumber(a.dampingRatio) : why("dampingRatio")],
                [`Convergence time (${unit}s)`, a.convergenceTime !== null ? formatNumber(a.convergenceTime) : why("convergenceTime")],
              ]}
            />
          </Block>
          <Block title="Checks of the model" id="report-checks">
            {a.diagnostics.length === 0 ? (
              <p>No problems found: survival out of every stage is at most 1, and the matrix is irreducible and primitive.</p>
            ) : (
              <ul className="list-disc space-y-1 pl-5">
                {a.diagnostics.map((d, i) => (
                  <li key={i} className={d.severity === "error" ? "text-brick" : ""}>
                    <span className="font-bold">{d.severity === "error" ? "Problem" : d.severity === "warning" ? "Warning" : "Note"}:</span> {d.message}
                  </li>
                ))}
              </ul>
            )}
          </Block>
        </>
      )}

      {r.levers && (
        <Block title="Levers" id="report-levers">
          {r.levers.problem && <p>No levers: {r.levers.problem}</p>}
          {r.levers.comparison ? (
            <>
              <p>The life cycle’s scenarios side by side: λ after each scenario’s planned changes, and the change from the baseline.</p>
              <Table caption="Scenarios compared" small {...tableOf(scenarioRows(r.levers))} />
              {r.figures.scenarios && (
                <Figure svg={r.figures.scenarios} alt="Bar chart of λ for the baseline and each scenario, with λ = 1 marked." caption="λ of the baseline (ink) and of each scenario (green at or above 1, clay below); dashed: λ = 1." />
              )}
            </>
          ) : (
            !r.levers.problem && <p>No scenarios yet: they are built on the Levers tab.</p>
          )}
          {r.levers.topLevers.length > 0 && (
            <>
              <p>
                The vital rates and matrix entries that move λ most, each changed alone by {Math.round(r.levers.relativeChange * 100)} % (exact change in λ, not a linear estimate):
              </p>
              <Table caption="Strongest levers" small {...tableOf(leverRows(r.levers))} />
            </>
          )}
          <p className="text-sm text-ink/75">Levers compare modelled changes; whether an action can achieve them is a question for field evidence and the responsible authority.</p>
        </Block>
      )}

      {r.climate && <ClimateBlock report={r} />}

      {r.risk && (
        <Block title="Risk" id="report-risk">
          <p>
            Newest finished Risk run ({r.risk.runId}
            {r.risk.finishedAt ? `, ${dateText(r.risk.finishedAt)}` : ""}): {r.risk.replicates.toLocaleString("en")} replicates over {r.risk.horizon} {r.risk.timeStepUnit}s; quasi-extinction means{" "}
            {r.risk.thresholdRule}.
          </p>
          <p>
            Probability of quasi-extinction within {r.risk.horizon} {r.risk.timeStepUnit}s: <strong>{formatPercent(r.risk.probability)}</strong> (95 % band {formatPercent(r.risk.lower)} – {formatPercent(r.risk.upper)}).
            {r.risk.lambdaS !== null && ` Stochastic growth rate λs = ${formatLambda(r.risk.lambdaS)} (95 % CI ${formatLambda(r.risk.lambdaSLower!)} – ${formatLambda(r.risk.lambdaSUpper!)}).`} Mean final abundance{" "}
            {formatNumber(r.risk.finalMean)}.
          </p>
          {r.figures.risk && <Figure svg={r.figures.risk} alt="Cumulative probability of quasi-extinction by year with its 95 % band." caption="Cumulative probability of quasi-extinction by year, with its 95 % band (dashed)." />}
          <p className="font-bold">IUCN criterion E: {r.risk.criterionE.highestMet ? `the ${r.risk.criterionE.highestMet} threshold is met` : "no threshold is met"}.</p>
          <ul className="list-disc space-y-1 pl-5 text-sm">
            {r.risk.criterionE.lines.map((l, i) => (
              <li key={i}>{l}</li>
            ))}
          </ul>
          <p className="text-sm text-ink/75">{r.risk.criterionE.caution} The run used the life cycle as it was when the run started.</p>
        </Block>
      )}

      <Block title="Review" id="report-review">
        <p className={r.review.status.state === "none" ? "" : "font-bold"} data-testid="report-review-status">
          {reviewStatusText(r.review)}
        </p>
        {r.review.reviews.length > 0 && <Table caption="Reviews" small {...tableOf(reviewRows(r.review))} />}
      </Block>

      <Block title="Cautions" id="report-cautions">
        <ul className="list-disc space-y-1 pl-5">
          {r.cautions.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
        <p className="text-sm text-ink/75">Where these results could inform a listing or a management decision, defer to the responsible authority and to expert review.</p>
      </Block>
    </article>
  );
}
