/**
 * The IUCN Red List criterion E check of a Risk run: one row per category
 * with its probability threshold, its horizon and how that horizon was set,
 * the run's probability with its 95 % interval, and the status in words and
 * a mark (never colour alone). The server decides the status
 * (shared/risk/iucn.ts); this only presents it.
 */
import type { CriterionEAssessment, CriterionECheck } from "../../../shared/risk";
import { Alert } from "../../components/ui/alert";
import { formatNumber } from "../../lib/number-format";
import { formatProbability, formatProbabilityRange, formatShare, pluralOf } from "./risk-format";

/** Generations in the CR and EN horizons ("10 years or 3 generations, whichever is longer"). */
const GENERATIONS: Partial<Record<CriterionECheck["category"], number>> = { CR: 3, EN: 5 };
/** The fixed-years part of each horizon. */
const YEARS: Record<CriterionECheck["category"], number> = { CR: 10, EN: 20, VU: 100 };

const years = (x: number) => `${formatNumber(x, 3)} years`;

/** "a", "a and b", "a, b and c". */
const listWords = (items: readonly string[]) => (items.length <= 1 ? (items[0] ?? "") : `${items.slice(0, -1).join(", ")} and ${items.at(-1)}`);

/** "3 generations = 3 × 8.5 years (mean age of parents)", or the server's words when the generation length is unknown. */
export function horizonBasis(check: CriterionECheck, generationYears: number | null): string {
  const g = GENERATIONS[check.category];
  if (g === undefined || generationYears === null || check.horizonYears === null) return check.horizonBasis;
  const byGenerations = g * generationYears;
  const generations = `${g} generations = ${g} × ${formatNumber(generationYears, 3)} years (mean age of parents)`;
  if (Math.abs(check.horizonYears - byGenerations) < 1e-9) return generations;
  if (check.horizonYears === YEARS[check.category] && byGenerations <= check.horizonYears) return `${years(check.horizonYears)}, longer than ${generations} = ${years(byGenerations)}`;
  if (check.horizonYears < byGenerations) return `${generations} = ${years(byGenerations)}, capped at ${years(check.horizonYears)}`;
  return check.horizonBasis;
}

const STATUS: Record<CriterionECheck["status"], { mark: string; word: string; style: string }> = {
  met: { mark: "●", word: "Threshold met", style: "border-brick bg-brick/10" },
  "not-met": { mark: "○", word: "Not met", style: "border-spruce bg-spruce/10" },
  undetermined: { mark: "?", word: "Run too short", style: "border-ochre bg-ochre/15" },
};

/** The status in words; an undetermined row says why (a short Run, or no generation length). */
export function statusWord(c: CriterionECheck): string {
  return c.status === "undetermined" && c.horizonYears === null ? "Cannot tell" : STATUS[c.status].word;
}

export function CriterionETable({ assessment, runYears, timeStepUnit }: { assessment: CriterionEAssessment; runYears: number; timeStepUnit: string }) {
  const G = assessment.generationLength?.years ?? null;
  const short = assessment.checks.filter((c) => c.status === "undetermined" && c.horizonYears !== null && !c.covered);
  const unknownGeneration = assessment.checks.some((c) => c.horizonYears === null);
  const longest = Math.max(0, ...short.map((c) => c.horizonYears ?? 0));
  const highest = assessment.checks.find((c) => c.category === assessment.highestMet);
  const perInterval = assessment.yearsPerInterval;

  return (
    <div className="space-y-3">
      <p className="font-bold" data-testid="criterion-e-verdict">
        {highest
          ? `The highest category whose criterion E threshold this Run meets: ${highest.name} (${highest.category}).`
          : "This Run meets none of the criterion E thresholds it could check."}
      </p>
      {short.length > 0 && (
        <Alert tone="warning" title="This Run is too short to judge every category.">
          <p>
            {listWords(short.map((c) => `${c.category} needs ${years(c.horizonYears ?? 0)}`))}, but the Run covers only {years(runYears * perInterval)}
            {perInterval === 1 ? "" : ` (${formatNumber(runYears, 4)} ${pluralOf(timeStepUnit)})`}. Start a new Run with a horizon of at least{" "}
            {Math.ceil(longest / perInterval - 1e-9)} {pluralOf(timeStepUnit)} to judge {short.length === 1 ? "it" : "them all"}.
          </p>
        </Alert>
      )}
      {unknownGeneration && (
        <Alert tone="warning" title="The generation length is unknown.">
          <p>The CR and EN horizons depend on it, so those rows cannot be judged from this Run alone.</p>
        </Alert>
      )}
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-left text-sm" data-testid="criterion-e-table">
          <caption className="sr-only">IUCN Red List criterion E: the Run’s quasi-extinction probabilities against each category’s threshold</caption>
          <thead>
            <tr className="border-b-2 border-ink/20">
              <th scope="col" className="px-2 py-2">
                Category
              </th>
              <th scope="col" className="px-2 py-2">
                Needs a probability of
              </th>
              <th scope="col" className="px-2 py-2">
                Within
              </th>
              <th scope="col" className="px-2 py-2">
                This Run (95 % interval)
              </th>
              <th scope="col" className="px-2 py-2">
                Status
              </th>
            </tr>
          </thead>
          <tbody>
            {assessment.checks.map((c) => {
              const status = STATUS[c.status];
              return (
                <tr key={c.category} className="border-b border-ink/10 align-top">
                  <th scope="row" className="px-2 py-2 font-bold">
                    {c.name} ({c.category})
                  </th>
                  <td className="px-2 py-2 tabular-nums">at least {formatShare(c.probabilityThreshold)}</td>
                  <td className="px-2 py-2">
                    <span className="font-bold tabular-nums">{c.horizonYears === null ? "unknown" : years(c.horizonYears)}</span>
                    {horizonBasis(c, G) !== (c.horizonYears === null ? "" : years(c.horizonYears)) && <span className="block text-xs text-ink/80">{horizonBasis(c, G)}</span>}
                  </td>
                  <td className="px-2 py-2 tabular-nums">
                    <span className="font-bold">{formatProbability(c.probability)}</span> ({formatProbabilityRange(c.lower, c.upper)})
                    <span className="block text-xs text-ink/80">by {timeStepUnit} {formatNumber(c.evaluatedAt, 4)}{c.covered ? "" : ", the end of the Run"}</span>
                  </td>
                  <td className="px-2 py-2">
                    <span className={`inline-flex items-center gap-1 rounded-full border px-2 py-0.5 text-xs font-bold whitespace-nowrap text-ink ${status.style}`}>
                      <span aria-hidden="true">{status.mark}</span>
                      {statusWord(c)}
                    </span>
                    {c.uncertain && c.status !== "undetermined" && <span className="mt-1 block text-xs">The interval straddles the threshold: more replicates could change this.</span>}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <details className="text-sm">
        <summary className="cursor-pointer font-bold text-indigo">How each row was read</summary>
        <ul className="mt-2 list-disc space-y-1 pl-5">
          {assessment.checks.map((c) => (
            <li key={c.category}>{c.explanation}</li>
          ))}
        </ul>
      </details>
      <p className="text-sm">
        {G === null
          ? "Generation length: unknown."
          : `Generation length: ${years(G)}, the mean age of the parents of a year’s offspring in the average life cycle of this Run.`}
      </p>
      {assessment.notes.length > 0 && (
        <ul className="list-disc space-y-1 pl-5 text-sm text-ink/85">
          {assessment.notes.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
      )}
      <Alert tone="info" live={false} title="Before using these numbers in an assessment">
        <p data-testid="criterion-e-caution">{assessment.caution}</p>
      </Alert>
    </div>
  );
}
