/**
 * The report as a PDF, composed with PDFKit. Figures are the report's SVGs
 * (the diagram and the ECharts charts drawn on the server), placed as
 * vectors with svg-to-pdfkit. DejaVu Sans is embedded because the standard
 * PDF fonts have no Greek (λ) and no minus sign. See
 * docs/decisions/report-pdf-on-the-server.md.
 */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import PDFDocument from "pdfkit";
import SVGtoPDF from "svg-to-pdfkit";
import { formatLambda, formatNumber, formatPercent } from "../../shared/format/number-format";
import { censusNote } from "../../shared/format/verdict";
import type { LifeCycleReport } from "../../shared/report/model";
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
} from "../../shared/report/text";
import type { Paper } from "../../shared/schemas/report";
import { INK, SPRUCE } from "../../shared/diagram/palette";

const require = createRequire(import.meta.url);
const FONT_DIR = path.join(path.dirname(require.resolve("dejavu-fonts-ttf/package.json")), "ttf");
// Read once: every report embeds a subset of these.
const REGULAR = readFileSync(path.join(FONT_DIR, "DejaVuSans.ttf"));
const BOLD = readFileSync(path.join(FONT_DIR, "DejaVuSans-Bold.ttf"));
const MUTED = "#4a555b";
const OCHRE = "#a87a12";

/** Page sizes in PostScript points. */
const PAPER: Record<Paper, [number, number]> = { a4: [595.28, 841.89], letter: [612, 792] };
const MARGIN = 50;

/** Renders the report; resolves with the PDF bytes. */
export function reportPdf(report: LifeCycleReport, paper: Paper): Promise<Buffer> {
  const doc = new PDFDocument({
    size: PAPER[paper],
    margin: MARGIN,
    bufferPages: true,
    info: { Title: `${report.lifeCycle.name}: Stagewright report`, Author: report.authors.join(", ") || "Stagewright", Subject: `Study: ${report.study.name}`, Creator: "Stagewright" },
  });
  const chunks: Buffer[] = [];
  doc.on("data", (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });
  doc.registerFont("Body", REGULAR);
  doc.registerFont("Bold", BOLD);
  draw(doc, report);
  // Page numbers and the life cycle's name in every footer.
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const y = doc.page.height - MARGIN + 16;
    // Writing below the bottom margin would start a new page: lift the margin while the footer is written.
    doc.page.margins.bottom = 0;
    doc.font("Body").fontSize(8).fillColor(MUTED);
    doc.text(`${report.lifeCycle.name} · Stagewright report · page ${i + 1} of ${range.count}`, MARGIN, y, { width: doc.page.width - 2 * MARGIN, align: "center", lineBreak: false });
  }
  doc.end();
  return done;
}

function draw(doc: PDFKit.PDFDocument, r: LifeCycleReport): void {
  const width = doc.page.width - 2 * MARGIN;
  const a = r.analysis;
  const unit = r.document.timeStepUnit;
  const names = r.document.stages.map((s) => s.name);

  /** A section heading, moved to a new page with what follows when less than `keep` points are left. */
  const heading = (text: string, keep = 80) => {
    if (doc.y > doc.page.height - MARGIN - keep) doc.addPage();
    doc.moveDown(0.8).font("Bold").fontSize(13).fillColor(SPRUCE).text(text, MARGIN, doc.y, { width });
    doc.moveDown(0.3).font("Body").fontSize(9.5).fillColor(INK);
  };
  /** A heading inside a section. */
  const subheading = (text: string, keep = 60) => {
    if (doc.y > doc.page.height - MARGIN - keep) doc.addPage();
    doc.moveDown(0.5).font("Bold").fontSize(10.5).fillColor(INK).text(text, MARGIN, doc.y, { width });
    doc.moveDown(0.2).font("Body").fontSize(9.5).fillColor(INK);
  };
  const para = (text: string, options: { color?: string; size?: number; bold?: boolean } = {}) => {
    doc.font(options.bold ? "Bold" : "Body").fontSize(options.size ?? 9.5).fillColor(options.color ?? INK).text(text, MARGIN, doc.y, { width });
    doc.fillColor(INK);
  };
  const figure = (svg: string, caption: string, maxHeight = 300) => {
    const size = svgSize(svg);
    const scale = Math.min(width / size.width, maxHeight / size.height, 1);
    const w = size.width * scale;
    const h = size.height * scale;
    if (doc.y + h + 30 > doc.page.height - MARGIN) doc.addPage();
    const top = doc.y + 4;
    SVGtoPDF(doc, svg, MARGIN + (width - w) / 2, top, { width: w, height: h, preserveAspectRatio: "xMidYMid meet", fontCallback: (_f, bold) => (bold ? "Bold" : "Body") });
    doc.y = top + h + 4;
    para(caption, { color: MUTED, size: 8 });
  };
  const table = (header: string[], rows: string[][], options: { fontSize?: number } = {}) => drawTable(doc, header, rows, options.fontSize ?? 8.5);

  // Title block
  doc.font("Body").fontSize(9).fillColor(MUTED).text("Stagewright report", MARGIN, MARGIN);
  doc.font("Bold").fontSize(20).fillColor(INK).text(r.lifeCycle.name, { width });
  doc.moveDown(0.3);
  para(`Study: ${r.study.name}`);
  para(describeSource(r));
  para(`Authors: ${r.authors.length ? r.authors.join(", ") : "—"}`);
  para(`Census: ${r.document.census}; time step: one ${unit}. Generated ${dateText(r.generatedAt)}.`, { color: MUTED, size: 8.5 });

  // Cautions, first as well as last: a reader of one page must see them.
  doc.moveDown(0.6);
  const boxTop = doc.y;
  doc.font("Body").fontSize(8.5);
  const cautionText = r.cautions.join(" ");
  const boxHeight = doc.heightOfString(cautionText, { width: width - 16 }) + 12;
  doc.rect(MARGIN, boxTop, width, boxHeight).lineWidth(1).strokeColor(OCHRE).stroke();
  doc.fillColor(INK).text(cautionText, MARGIN + 8, boxTop + 6, { width: width - 16 });
  doc.y = boxTop + boxHeight;

  // Headline
  heading("Growth rate λ");
  if (a && a.lambda !== null) {
    doc.font("Bold").fontSize(16).fillColor(INK).text(`λ = ${formatLambda(a.lambda)}`, MARGIN, doc.y, { width });
    if (r.verdict) para(`The population is ${r.verdict.headline} once its stage structure has settled.${r.verdict.detail ? ` ${r.verdict.detail}` : ""}`);
    para(lambdaIntervalText(a) ?? "No interval for λ: no vital rate carries an SE, a CI or counts. A Risk run shows the effect of variation over time.", { color: lambdaIntervalText(a) ? INK : MUTED, size: lambdaIntervalText(a) ? 9.5 : 8.5 });
    const monteCarlo = lambdaRunText(r);
    if (monteCarlo) para(monteCarlo);
    para(censusNote(r.document.census), { color: MUTED, size: 8.5 });
  } else {
    para(`λ cannot be computed: ${r.analysisProblem ?? a?.nullReasons.lambda ?? "the model is incomplete."}`, { color: "#9f2d2d" });
  }

  heading("Life-cycle diagram", 220);
  figure(r.figures.diagram, "Stages (with their stable-stage share and reproductive value) and arrows: survival and growth solid green, reproduction dashed clay, each labelled with its rate.", 330);

  heading("Stages");
  table(
    ["Stage", "Stable share w", "Reproductive value v", `Life expectancy (${unit}s)`],
    names.map((n, i) => [n, a?.stableStage ? formatPercent(a.stableStage[i]!) : "—", a?.reproductiveValue ? formatNumber(a.reproductiveValue[i]) : "—", a?.lifeHistory ? formatNumber(a.lifeHistory.lifeExpectancy[i]) : "—"]),
  );
  if (a?.reproductiveValueScaling) para(`v is scaled so that v = 1 for ${names[a.reproductiveValueScaling.index] ?? "the first stage"}.`, { color: MUTED, size: 8 });

  heading("Vital rates");
  if (r.document.rates.length === 0) para("The arrows carry numbers; no named vital rates.");
  else
    table(
      ["Rate", "Value", "Uncertainty", "Unit", "Source", ...(a ? ["Elasticity of λ"] : [])],
      r.document.rates.map((rate) => {
        const e = a?.vitalRates.find((v) => v.name === rate.name);
        return [rate.name, formatNumber(rate.value), uncertaintyText(rate), rate.unit ?? "—", rate.source ?? "—", ...(a ? [e ? formatNumber(e.elasticity, 3) : "—"] : [])];
      }),
    );

  heading("Projection matrix A");
  if (a) {
    const n = names.length;
    const size = n > 12 ? 6 : n > 8 ? 7 : 8.5;
    para("Rows: stage at t+1; columns: stage at t. Reproduction entries are part of F, the rest of U.", { color: MUTED, size: 8 });
    table(["to \\ from", ...names], a.matrices.A.map((row, i) => [names[i]!, ...row.map((v) => (v === 0 ? "0" : formatNumber(v)))]), { fontSize: size });
  } else para("The matrix cannot be built until every rate can be computed.");

  if (a?.elasticity && r.figures.elasticity) {
    heading("Elasticities", 260);
    para("Each cell is the share of λ's response to a proportional change in that matrix entry; they sum to 1. Darker cells are stronger levers.");
    figure(r.figures.elasticity, "Elasticity e_ij = (a_ij/λ) ∂λ/∂a_ij; rows: stage at t+1, columns: stage at t.", 320);
  }
  if (r.figures.stageVectors) {
    heading("Stable stage distribution and reproductive values", 260);
    figure(r.figures.stageVectors, "w: share of each stage once the structure has settled; v: each stage's worth to future growth.", 240);
  }

  if (a) {
    heading("Life history and convergence");
    const lh = a.lifeHistory;
    const why = (field: string) => a.nullReasons[field] ?? lh?.nullReasons[field.replace("lifeHistory.", "")] ?? "not available";
    table(
      ["Measure", "Value"],
      [
        ["Net reproductive rate R0 (offspring per lifetime)", lh ? formatNumber(lh.netReproductiveRate) : why("lifeHistory")],
        [`Generation time ln R0 / ln λ (${unit}s)`, lh?.generationTimeR0 != null ? formatNumber(lh.generationTimeR0) : why("lifeHistory.generationTimeR0")],
        [`Mean age of parents (${unit}s)`, lh?.meanAgeOfParents != null ? formatNumber(lh.meanAgeOfParents) : why("lifeHistory.meanAgeOfParents")],
        ["Damping ratio ρ = λ/|λ₂|", a.dampingRatio !== null ? formatNumber(a.dampingRatio) : why("dampingRatio")],
        [`Convergence time t${a.convergenceFactor === 10 ? "₁₀" : ""} (${unit}s)`, a.convergenceTime !== null ? formatNumber(a.convergenceTime) : why("convergenceTime")],
      ],
    );

    heading("Checks of the model");
    if (a.diagnostics.length === 0) para("No problems found: survival out of every stage is at most 1, and the matrix is irreducible and primitive.");
    for (const d of a.diagnostics) para(`${d.severity === "error" ? "✕" : d.severity === "warning" ? "!" : "•"} ${d.message}`, { color: d.severity === "error" ? "#9f2d2d" : INK });
  }

  if (r.levers) {
    const lv = r.levers;
    heading("Levers", 160);
    if (lv.problem) para(`No levers: ${lv.problem}`);
    if (lv.comparison) {
      para("The life cycle's scenarios side by side: λ after each scenario's planned changes, and the change from the baseline.");
      const t = scenarioRows(lv);
      table(t.header, t.rows, { fontSize: 8 });
      if (r.figures.scenarios) figure(r.figures.scenarios, "λ of the baseline (ink) and of each scenario (green at or above 1, clay below); dashed: λ = 1.", 230);
    } else if (!lv.problem) para("No scenarios yet: they are built on the Levers tab.");
    if (lv.topLevers.length > 0) {
      para(`The vital rates and matrix entries that move λ most, each changed alone by ${Math.round(lv.relativeChange * 100)} % (exact change in λ, not a linear estimate):`);
      const t = leverRows(lv);
      table(t.header, t.rows, { fontSize: 8 });
    }
    para("Levers compare modelled changes; whether an action can achieve them is a question for field evidence and the responsible authority.", { color: MUTED, size: 8 });
  }

  if (r.climate) {
    const c = r.climate;
    heading("Climate", 200);
    const [intro, ...findings] = climateFindings(c, a?.lambda ?? null, unit);
    para(intro!);
    const t = thermalResponseRows(c);
    table(t.header, t.rows, { fontSize: 7.5 });
    for (const note of thermalNotes(c)) para(note, { color: MUTED, size: 7.5 });
    doc.moveDown(0.3);
    for (const line of findings) para(line);
    if (r.figures.climate) figure(r.figures.climate, "λ over temperature; the shaded band is the persistence window (λ ≥ 1), its edges marked in °C; dashed: λ = 1; the dot marks the highest λ.", 250);
    const slope = slopeRows(c);
    if (slope) {
      doc.moveDown(0.4);
      para("Where the slope comes from: each responding rate's part (∂λ/∂rate)·(d rate/dT).");
      table(slope.header, slope.rows, { fontSize: 8 });
    }
    if (c.warming) {
      subheading("Warming trajectory", 160);
      for (const line of warmingLines(c.warming)) para(line);
      if (r.figures.warming) figure(r.figures.warming, "Total population under the warming trajectory: without year-to-year noise (ink), and the median (green) with 5 % and 95 % (dashed) of the replicates.", 250);
    }
    subheading("Cautions for these Climate results");
    for (const caution of c.cautions) para(`• ${caution}`, { size: 8.5 });
  }

  if (r.risk) {
    const k = r.risk;
    heading("Risk");
    para(
      `Newest finished Risk run (${k.runId}${k.finishedAt ? `, ${dateText(k.finishedAt)}` : ""}): ${k.replicates.toLocaleString("en")} replicates over ${k.horizon} ${k.timeStepUnit}s; quasi-extinction means ${k.thresholdRule}.`,
    );
    para(
      `Probability of quasi-extinction within ${k.horizon} ${k.timeStepUnit}s: ${formatPercent(k.probability)} (95 % band ${formatPercent(k.lower)} – ${formatPercent(k.upper)}).` +
        (k.lambdaS !== null ? ` Stochastic growth rate λs = ${formatLambda(k.lambdaS)} (95 % CI ${formatLambda(k.lambdaSLower!)} – ${formatLambda(k.lambdaSUpper!)}).` : "") +
        ` Mean final abundance ${formatNumber(k.finalMean)}.`,
    );
    if (r.figures.risk) figure(r.figures.risk, "Cumulative probability of quasi-extinction by year, with its 95 % band (dashed).", 240);
    para(`IUCN criterion E: ${k.criterionE.highestMet ? `the ${k.criterionE.highestMet} threshold is met` : "no threshold is met"}.`, { bold: true });
    for (const line of k.criterionE.lines) para(`• ${line}`, { size: 8.5 });
    para(k.criterionE.caution, { color: MUTED, size: 8 });
    para("The run used the life cycle as it was when the run started.", { color: MUTED, size: 8 });
  }

  heading("Review");
  para(reviewStatusText(r.review), { bold: r.review.status.state !== "none" });
  if (r.review.reviews.length > 0) {
    const t = reviewRows(r.review);
    table(t.header, t.rows, { fontSize: 8 });
  }

  heading("Cautions");
  for (const c of r.cautions) para(`• ${c}`);
  para("Where these results could inform a listing or a management decision, defer to the responsible authority and to expert review.", { color: MUTED, size: 8.5 });
}

/**
 * A plain table: columns share the width by their longest text (within
 * bounds), rows break across pages and the header repeats on each page.
 * (PDFKit's own table measured ~70 ms a row here, too slow for a report.)
 */
function drawTable(doc: PDFKit.PDFDocument, header: string[], rows: string[][], fontSize: number): void {
  const width = doc.page.width - 2 * MARGIN;
  const pad = 3;
  doc.font("Body").fontSize(fontSize);
  // Each column gets at least its widest word (so no word breaks) and shares the rest by its longest text.
  const widest = (texts: string[], measure: (t: string) => number) => texts.reduce((m, t) => Math.max(m, measure(t)), 0);
  const wordWidth = (t: string) => widest(t.split(/\s+/), (w) => doc.widthOfString(w));
  const cells = (c: number) => rows.map((r) => r[c] ?? "");
  // The header is bold: measure it in its own font.
  doc.font("Bold").fontSize(fontSize);
  const headerWords = header.map((h) => wordWidth(h));
  const headerWidths = header.map((h) => doc.widthOfString(h));
  doc.font("Body").fontSize(fontSize);
  const words = header.map((_, c) => Math.max(headerWords[c]!, widest(cells(c), wordWidth)) + 2 * pad);
  const longest = header.map((_, c) => Math.min(Math.max(headerWidths[c]!, widest(cells(c), (t) => doc.widthOfString(t))) + 2 * pad, width * 0.5));
  const spare = Math.max(0, width - words.reduce((a, b) => a + b, 0));
  const extra = longest.map((l, c) => Math.max(0, l - words[c]!));
  const extraSum = extra.reduce((a, b) => a + b, 0);
  const wordSum = words.reduce((a, b) => a + b, 0);
  const widths =
    wordSum > width
      ? words.map((w) => (w * width) / wordSum) // too many columns: shrink them all (long words may break)
      : words.map((w, c) => w + (extraSum > 0 ? (spare * extra[c]!) / extraSum : spare / words.length));
  const rowHeight = (cells: string[], font: string) => {
    doc.font(font).fontSize(fontSize);
    return Math.max(...cells.map((t, c) => doc.heightOfString(t, { width: widths[c]! - 2 * pad }))) + 2 * pad;
  };
  const drawRow = (cells: string[], head: boolean) => {
    const font = head ? "Bold" : "Body";
    const h = rowHeight(cells, font);
    if (doc.y + h > doc.page.height - MARGIN) {
      doc.addPage();
      if (!head) drawRow(header, true);
    }
    const y = doc.y;
    if (head) doc.rect(MARGIN, y, width, h).fillColor("#eceae4").fill();
    let x = MARGIN;
    doc.font(font).fontSize(fontSize).fillColor(INK);
    cells.forEach((t, c) => {
      doc.text(t, x + pad, y + pad, { width: widths[c]! - 2 * pad, lineBreak: true });
      x += widths[c]!;
    });
    doc.moveTo(MARGIN, y + h).lineTo(MARGIN + width, y + h).lineWidth(head ? 0.8 : 0.4).strokeColor("#c9ccc8").stroke();
    doc.x = MARGIN;
    doc.y = y + h;
  };
  doc.y += 2;
  drawRow(header, true);
  for (const r of rows) drawRow(r, false);
  doc.font("Body").fontSize(9.5).fillColor(INK);
  doc.moveDown(0.3);
}

function svgSize(svg: string): { width: number; height: number } {
  const w = /<svg[^>]*\swidth="([\d.]+)"/.exec(svg);
  const h = /<svg[^>]*\sheight="([\d.]+)"/.exec(svg);
  return { width: w ? Number(w[1]) : 400, height: h ? Number(h[1]) : 300 };
}
