import type { BrowserAgent } from "./server";

/** Multipart upload the way the web client sends it: the file plus text fields, with the CSRF header. */
export function uploadCsv(
  agent: BrowserAgent,
  url: string,
  file: { content: string | Buffer; name?: string },
  fields: Record<string, string | object | undefined> = {},
) {
  let req = agent.agent.post(url).set("X-CSRF-Token", agent.csrf);
  for (const [k, v] of Object.entries(fields)) if (v !== undefined) req = req.field(k, typeof v === "string" ? v : JSON.stringify(v));
  return req.attach("file", Buffer.isBuffer(file.content) ? file.content : Buffer.from(file.content, "utf8"), file.name ?? "data.csv");
}

export const COUNTS_CSV = ["year,count,site", "2010,120,North", "2011,131,North", "2012,118,North", "2013,140,North", "2014,151,North", "2010,60,South", "2011,52,South", "2013,41,South", "2014,39,South"].join("\n");
export const countsFields = (name = "Counts") => ({ kind: "counts", name, mapping: { time: "year", count: "count", site: "site" } });

/** Stage fates: J (juvenile) and A (adult); j1–j10 and a1–a5 in 2020, a few followed into 2021. */
export const FATES_CSV = [
  "id,year,stage,fate,offspring",
  ...["dead", "dead", "dead", "J", "J", "J", "J", "A", "A", "A"].map((f, k) => `j${k + 1},2020,J,${f},0`),
  ...[["dead", 2], ["A", 3], ["A", 1], ["A", 4], ["A", 0]].map(([f, o], k) => `a${k + 1},2020,A,${f},${o}`),
].join("\n");
export const fatesFields = (name = "Fates", options: object = {}) => ({
  kind: "stage-fates",
  name,
  mapping: { individual: "id", year: "year", stage: "stage", fate: "fate", offspring: "offspring" },
  options: { stages: ["J", "A"], ...options },
});
