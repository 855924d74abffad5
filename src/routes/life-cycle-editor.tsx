/**
 * The life-cycle editor: one life cycle, its header (name, save status,
 * undo/redo, λ) and its tabs. This page owns the document (through the
 * editor-state feature) and hands it to each tab's feature with the same
 * props; the tabs never talk to each other.
 */
import { Tab, TabGroup, TabList, TabPanel, TabPanels } from "@headlessui/react";
import { useSuspenseQuery } from "@tanstack/react-query";
import { type ReactNode, Suspense, lazy, useMemo, useState } from "react";
import { Link, useNavigate, useParams, useSearchParams } from "react-router";
import { roleAtLeast } from "../../shared/schemas";
import { type LifeCycleRecord, lifeCycleQueryOptions } from "../api/life-cycles";
import { useStudy } from "../api/studies";
import { Badge } from "../components/ui/badge";
import { ErrorBoundary } from "../components/ui/error-boundary";
import { Loading } from "../components/ui/spinner";
import { RelativeTime } from "../components/ui/time";
import {
  ConflictBanner,
  LambdaReadout,
  NameField,
  SaveStatus,
  UndoRedoButtons,
  useLifeCycleEditor,
  useLiveAnalysis,
} from "../features/editor-state";
import type { ExportPanelProps } from "../features/export";
import type { HistoryPanelProps } from "../features/history";
import type { LeversPanelProps } from "../features/levers";
import { openThreadCounts } from "../features/review/anchors";
import { LifeCycleReviewStatus } from "../features/review/review-status";
import type { ReviewPanelProps } from "../features/review";
import type { RiskPanelProps } from "../features/risk";
import { useComments } from "../api/comments";
import type { CommentAnchor } from "../../shared/schemas/review";
import type { UncertaintyPanelProps } from "../features/uncertainty";
import type { EditorPanelProps, Selection } from "../lib/editor-types";
import { ROLE_LABELS } from "../lib/roles";
import { paths } from "./paths";

// Each tab's code (the diagram library, the charts) loads when the tab is first opened.
const DiagramPanel = lazy(() => import("../features/diagram").then((m) => ({ default: m.DiagramPanel })));
const RatesPanel = lazy(() => import("../features/rates").then((m) => ({ default: m.RatesPanel })));
const MatrixPanel = lazy(() => import("../features/matrix").then((m) => ({ default: m.MatrixPanel })));
const ResultsPanel = lazy(() => import("../features/results").then((m) => ({ default: m.ResultsPanel })));
const LeversPanel = lazy(() => import("../features/levers").then((m) => ({ default: m.LeversPanel })));
const ClimatePanel = lazy(() => import("../features/climate").then((m) => ({ default: m.ClimatePanel })));
const RiskPanel = lazy(() => import("../features/risk").then((m) => ({ default: m.RiskPanel })));
const UncertaintyPanel = lazy(() => import("../features/uncertainty").then((m) => ({ default: m.UncertaintyPanel })));
const HistoryPanel = lazy(() => import("../features/history").then((m) => ({ default: m.HistoryPanel })));
const ExportPanel = lazy(() => import("../features/export").then((m) => ({ default: m.ExportPanel })));
const ReviewPanel = lazy(() => import("../features/review").then((m) => ({ default: m.ReviewPanel })));

type TabId = "diagram" | "rates" | "matrix" | "results" | "uncertainty" | "levers" | "climate" | "risk" | "review" | "history" | "export";

interface TabContext {
  /** The panel props for one tab (each tab gets its own `onSelect`). */
  panel: (tab: TabId) => EditorPanelProps;
  levers: LeversPanelProps;
  risk: RiskPanelProps;
  uncertainty: UncertaintyPanelProps;
  climate: { lifeCycleId: string; saved: boolean };
  history: HistoryPanelProps;
  exports: ExportPanelProps;
  review: ReviewPanelProps;
}

const TABS: readonly { id: TabId; label: string; render: (c: TabContext) => ReactNode }[] = [
  { id: "diagram", label: "Diagram", render: (c) => <DiagramPanel {...c.panel("diagram")} /> },
  { id: "rates", label: "Rates", render: (c) => <RatesPanel {...c.panel("rates")} /> },
  { id: "matrix", label: "Matrix", render: (c) => <MatrixPanel {...c.panel("matrix")} /> },
  { id: "results", label: "Results", render: (c) => <ResultsPanel {...c.panel("results")} /> },
  { id: "uncertainty", label: "Uncertainty", render: (c) => <UncertaintyPanel {...c.uncertainty} /> },
  { id: "levers", label: "Levers", render: (c) => <LeversPanel {...c.levers} /> },
  { id: "climate", label: "Climate", render: (c) => <ClimatePanel {...c.panel("climate")} {...c.climate} /> },
  { id: "risk", label: "Risk", render: (c) => <RiskPanel {...c.risk} /> },
  { id: "review", label: "Review", render: (c) => <ReviewPanel {...c.review} /> },
  // Keyed by the compared snapshot, so "See the changes" opens a fresh comparison.
  { id: "history", label: "History", render: (c) => <HistoryPanel key={c.history.compareWith ?? ""} {...c.history} /> },
  { id: "export", label: "Export", render: (c) => <ExportPanel {...c.exports} /> },
];

const tabClasses = ({ selected }: { selected: boolean }) =>
  `rounded-t-md border border-b-0 px-4 py-2 font-bold ${
    selected ? "border-ink/20 bg-white text-indigo underline decoration-2 underline-offset-4" : "border-transparent text-ink hover:bg-ink/5"
  }`;

export function LifeCycleEditorPage() {
  const { lifeCycleId = "" } = useParams();
  const record = useSuspenseQuery(lifeCycleQueryOptions(lifeCycleId)).data;
  // A new life cycle (a copy after a conflict, say) starts a fresh editor.
  return <LifeCycleEditor key={record.id} initial={record} />;
}

function LifeCycleEditor({ initial }: { initial: LifeCycleRecord }) {
  const study = useStudy(initial.studyId);
  const readOnly = !roleAtLeast(study.role, "editor");
  const editor = useLifeCycleEditor(initial, { readOnly });
  const analysis = useLiveAnalysis(initial.id, editor.present);
  const [selection, setSelection] = useState<Selection | null>(null);
  const navigate = useNavigate();
  const [search, setSearch] = useSearchParams();
  const current = Math.max(
    0,
    TABS.findIndex((t) => t.id === search.get("tab")),
  );
  const { document } = editor;
  const comments = useComments(initial.id);
  const commentCounts = useMemo(() => openThreadCounts(comments.data ?? []), [comments.data]);

  const showTab = (index: number) =>
    setSearch(
      () => {
        // A thread, snapshot or comparison named in the address belongs to the tab it was opened on.
        const next = new URLSearchParams();
        if (index !== 0) next.set("tab", TABS[index]?.id ?? "diagram");
        return next;
      },
      { replace: true },
    );

  const tabIndex = (id: TabId) => TABS.findIndex((t) => t.id === id);
  /** Opens a tab with extra search parameters (thread, snapshot, compare) in the address. */
  const openTab = (id: TabId, extra: Record<string, string> = {}) =>
    setSearch(
      () => {
        const next = new URLSearchParams();
        if (id !== "diagram") next.set("tab", id);
        for (const [k, v] of Object.entries(extra)) next.set(k, v);
        return next;
      },
      { replace: true },
    );
  const showChanges = (snapshotId: string) => openTab("history", { compare: snapshotId });
  // A comment's "Show" selects its anchor on the tab that shows it.
  const showAnchor = (anchor: CommentAnchor) => {
    if (anchor.kind === "snapshot") return showChanges(anchor.snapshotId);
    if (anchor.kind === "lifeCycle") return;
    setSelection(anchor.kind === "cell" ? { kind: "cell", to: anchor.to, from: anchor.from } : { kind: anchor.kind, id: anchor.id });
    showTab(tabIndex(anchor.kind === "cell" ? "matrix" : anchor.kind === "rate" ? "rates" : "diagram"));
  };

  const panelProps = (tab: TabId): EditorPanelProps => ({
      document,
      onChange: editor.change,
      readOnly,
      analysis,
      selection,
      // A stage or arrow picked on another tab ("show in the diagram") is shown on the Diagram tab.
      onSelect: (next) => {
        setSelection(next);
        if (tab !== "diagram" && (next?.kind === "stage" || next?.kind === "transition")) showTab(0);
      },
      commentCounts,
  });
  const context: TabContext = {
    panel: panelProps,
    levers: { ...panelProps("levers"), lifeCycleId: initial.id, studyId: study.id, revision: editor.present.revision, saveStatus: editor.save.status },
    risk: { lifeCycleId: initial.id, studyId: study.id, document, analysis, readOnly, saveStatus: editor.save.status, version: editor.version },
    uncertainty: { lifeCycleId: initial.id, document, analysis, readOnly, saveStatus: editor.save.status, version: editor.version },
    climate: { lifeCycleId: initial.id, saved: editor.save.status === "saved" },
    history: { lifeCycleId: initial.id, version: editor.version, readOnly, onRestored: editor.reset, compareWith: search.get("compare") },
    exports: { document, analysis },
    review: {
      lifeCycleId: initial.id,
      studyId: study.id,
      role: study.role,
      document,
      selection,
      onShowAnchor: showAnchor,
      focusThreadId: search.get("thread"),
      focusSnapshotId: search.get("snapshot"),
      onShowChanges: showChanges,
    },
  };

  return (
    <div className="space-y-4">
      <title>{`${document.name} · Stagewright`}</title>
      <header className="space-y-3 border-b border-ink/15 pb-4">
        <nav aria-label="Breadcrumb" className="text-sm">
          <ol className="flex flex-wrap gap-1 text-ink/80">
            <li>
              <Link to={paths.studies()} className="underline underline-offset-2 hover:text-indigo">
                Studies
              </Link>
              <span aria-hidden="true"> /</span>
            </li>
            <li>
              <Link to={paths.study(study.id)} className="underline underline-offset-2 hover:text-indigo">
                {study.name}
              </Link>
              <span aria-hidden="true"> /</span>
            </li>
            <li aria-current="page">Life cycle</li>
          </ol>
        </nav>
        <div className="flex flex-wrap items-center justify-between gap-3">
          <div className="flex min-w-0 flex-wrap items-center gap-3">
            <NameField name={document.name} readOnly={readOnly} onRename={(name) => editor.change({ ...document, name }, "Rename life cycle")} />
            {readOnly && <Badge>Read only · {ROLE_LABELS[study.role]}</Badge>}
            <LifeCycleReviewStatus lifeCycleId={initial.id} onShowChanges={showChanges} />
          </div>
          <div className="flex flex-wrap items-center gap-3">
            <LambdaReadout analysis={analysis} hasStages={document.stages.length > 0} timeStepUnit={document.timeStepUnit} />
            <Link
              to={paths.report(initial.id)}
              className="rounded-md border border-ink/30 bg-white px-3 py-1.5 text-sm font-bold hover:bg-ink/5"
              title="The saved state, laid out for printing, with a PDF download"
            >
              Report
            </Link>
            {readOnly ? (
              <p className="text-sm">
                Version {editor.version}
                {editor.updatedBy && <> · saved by {editor.updatedBy}</>} <RelativeTime iso={initial.updatedAt} />
              </p>
            ) : (
              <>
                <SaveStatus save={editor.save} version={editor.version} onSaveNow={editor.saveNow} />
                <UndoRedoButtons
                  canUndo={editor.canUndo}
                  canRedo={editor.canRedo}
                  undoLabel={editor.undoLabel}
                  redoLabel={editor.redoLabel}
                  onUndo={editor.undo}
                  onRedo={editor.redo}
                />
              </>
            )}
          </div>
        </div>
        {readOnly && (
          <p className="text-sm text-ink/80">
            Your role in this Study is {ROLE_LABELS[study.role].toLowerCase()}: you can read this life cycle and its results, but not change it.
          </p>
        )}
        {editor.save.status === "conflict" && (
          <ConflictBanner
            studyId={study.id}
            current={editor.save.current}
            myVersion={editor.version}
            mine={document}
            onReload={() => editor.save.status === "conflict" && editor.reset(editor.save.current)}
            onCopied={(copy) => navigate(paths.lifeCycle(copy.id))}
          />
        )}
      </header>

      <TabGroup selectedIndex={current} onChange={showTab}>
        <TabList aria-label="Life-cycle editor" className="flex flex-wrap gap-1 border-b border-ink/20">
          {TABS.map((t) => (
            <Tab key={t.id} className={tabClasses}>
              {t.label}
              {t.id === "review" && commentCounts.size > 0 && (
                <span className="ml-1.5 rounded-full bg-indigo px-1.5 text-xs text-white" aria-label={`, ${[...commentCounts.values()].reduce((a, b) => a + b, 0)} open threads on the model`}>
                  {[...commentCounts.values()].reduce((a, b) => a + b, 0)}
                </span>
              )}
            </Tab>
          ))}
        </TabList>
        <TabPanels className="pt-4">
          {TABS.map((t) => (
            <TabPanel key={t.id} className="focus:outline-none">
              <ErrorBoundary what={`the ${t.label} tab`} resetKey={editor.present.revision}>
                <Suspense fallback={<Loading label={`Loading the ${t.label} tab…`} />}>{t.render(context)}</Suspense>
              </ErrorBoundary>
            </TabPanel>
          ))}
        </TabPanels>
      </TabGroup>
    </div>
  );
}
