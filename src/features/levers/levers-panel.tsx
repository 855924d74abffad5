/**
 * Levers: which action helps this population most, and why. Scenarios are
 * built here and kept in the life cycle; the comparison, the lever ranking
 * and the break-even values are computed by the server on the document the
 * editor shows (saved or not); the LTRE compares it with another life cycle
 * of the Study. The cautions stay at the foot of the tab.
 */
import { useState } from "react";
import { useLevers, type LeverSettings } from "../../api/levers";
import { Alert } from "../../components/ui/alert";
import { CommitInput } from "../../components/ui/commit-input";
import { QueryError } from "../../components/ui/query-error";
import { Loading, Spinner } from "../../components/ui/spinner";
import { parseNumberInput } from "../../lib/number-input";
import { BreakEvenSection } from "./break-even-section";
import { ComparisonSection } from "./comparison-section";
import { LtreSection } from "./ltre-section";
import { RankingSection } from "./ranking-section";
import { useRankStability } from "./rank-stability";
import { ScenariosEditor } from "./scenarios-editor";
import { Section } from "./section";
import type { LeversPanelProps } from "./types";

export type { LeversPanelProps };

export const CAUTIONS =
  "Results support and do not replace expert judgement; status listings and management decisions follow the rules of the responsible authority and peer review; models are only as good as their data.";

export function LeversPanel(props: LeversPanelProps) {
  const { document: doc, readOnly, onChange, lifeCycleId, revision } = props;
  const [relativeChange, setRelativeChange] = useState(0.1);
  const [target, setTarget] = useState(1);
  const settings: LeverSettings = { relativeChange, target, breakEven: false };
  const levers = useLevers(lifeCycleId, revision, doc, settings);
  const stability = useRankStability(lifeCycleId);
  const breakEven = useLevers(lifeCycleId, revision, doc, { ...settings, breakEven: true });
  const stale = levers.isPlaceholderData || levers.isFetching;

  return (
    <section aria-labelledby="levers-heading" className="space-y-5">
      <div className="space-y-1">
        <h2 id="levers-heading" className="text-xl font-bold">
          Levers
        </h2>
        <p className="max-w-3xl text-sm text-ink/85">
          Which action helps this population most? Write each management action as a scenario, compare them side by side, see which vital rates and matrix entries
          move λ most, how far each would have to move for the population to replace itself, and what made two life cycles differ.
        </p>
      </div>

      <Section id="levers-scenarios" title="Scenarios" help={<p>Each change multiplies, adds to or sets one vital rate or one matrix entry. Scenarios are saved with the life cycle and kept in its snapshots.</p>}>
        <ScenariosEditor document={doc} readOnly={readOnly} onChange={onChange} />
      </Section>

      {doc.stages.length === 0 ? (
        <p className="rounded-md border border-dashed border-ink/30 p-4 text-ink/80">Add stages and arrows in the Diagram first; the levers of a life cycle follow from its matrix.</p>
      ) : levers.error && !levers.data ? (
        <QueryError error={levers.error} what="the levers of this life cycle" />
      ) : !levers.data ? (
        <Loading label="Computing the levers…" />
      ) : (
        <>
          {levers.error && (
            <Alert tone="warning" title="Last good result — the current model cannot be used:">
              <p>{levers.error.message}</p>
            </Alert>
          )}
          {stale && !levers.error && (
            <p role="status" className="flex items-center gap-2 rounded-md border border-indigo/40 bg-indigo/5 px-3 py-2 text-sm">
              <Spinner />
              Recomputing… the numbers below are for the model as it was a moment ago.
            </p>
          )}
          <div className={`space-y-5 transition-opacity ${stale ? "opacity-60" : ""}`} data-stale={stale || undefined}>
            <ComparisonSection {...props} data={levers.data} />
            <RankingSection
              data={levers.data}
              stability={stability}
              relativeChange={relativeChange}
              control={
                <div className="w-44 space-y-1 text-sm">
                  <span className="block font-bold">Relative change (%)</span>
                  <CommitInput
                    label="Relative change in percent"
                    value={String(Number((relativeChange * 100).toPrecision(6)))}
                    check={(t) => {
                      const v = parseNumberInput(t);
                      return { error: v === null || !(v > 0) || v > 1000 ? "A percentage above 0 and at most 1000." : null };
                    }}
                    onCommit={(t) => setRelativeChange(parseNumberInput(t)! / 100)}
                  />
                </div>
              }
            />
          </div>
        </>
      )}

      {doc.stages.length > 0 && (
        <BreakEvenSection
          query={breakEven}
          target={target}
          control={
            <div className="w-44 space-y-1 text-sm">
              <span className="block font-bold">Target λ</span>
              <CommitInput
                label="Target λ"
                value={String(target)}
                check={(t) => {
                  const v = parseNumberInput(t);
                  return { error: v === null || !(v > 0) || v > 100 ? "A λ above 0 and at most 100, e.g. 1." : null };
                }}
                onCommit={(t) => setTarget(parseNumberInput(t)!)}
              />
            </div>
          }
        />
      )}

      {doc.stages.length > 0 && <LtreSection {...props} />}

      <footer className="border-t border-ink/15 pt-3 text-sm text-ink/85">
        <p data-testid="levers-cautions">
          <span aria-hidden="true" className="mr-1 font-bold text-indigo">
            i
          </span>
          {CAUTIONS}
        </p>
      </footer>
    </section>
  );
}
