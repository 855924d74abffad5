// `npm run audit`: the production dependencies' known advisories, by severity
// (`npm audit --omit=dev`), with one line per high or critical advisory.
// Not part of `npm test`: a newly published advisory must not break CI.
// Exit code: 0 none high/critical, 1 some, 2 the audit service could not be asked.
import { spawnSync } from "node:child_process";

const r = spawnSync("npm", ["audit", "--omit=dev", "--json"], { encoding: "utf8" });
let report;
try {
  report = JSON.parse(r.stdout);
} catch {
  report = null;
}
if (!report?.metadata) {
  const why = `${r.stderr ?? ""}${report?.error ? JSON.stringify(report.error) : ""}`.split("\n").filter((l) => /audit|error|\d{3}/i.test(l)).slice(0, 4).join("\n");
  console.log(`npm audit could not reach the registry's audit service, so nothing was measured:\n${why}`);
  process.exit(2);
}
const v = report.metadata.vulnerabilities;
console.log(`production dependencies: ${report.metadata.dependencies?.prod ?? report.metadata.dependencies} packages`);
console.log(`advisories: critical ${v.critical}, high ${v.high}, moderate ${v.moderate}, low ${v.low}, info ${v.info}`);
for (const [name, vuln] of Object.entries(report.vulnerabilities ?? {})) {
  if (vuln.severity !== "high" && vuln.severity !== "critical") continue;
  const via = vuln.via.map((x) => (typeof x === "string" ? `through ${x}` : `${x.title} (${x.url}, ${x.range})`)).join("; ");
  console.log(`  ${vuln.severity} ${name} ${vuln.range}: ${via}${vuln.fixAvailable ? " — a fix is available" : ""}`);
}
process.exit(v.critical + v.high > 0 ? 1 : 0);
