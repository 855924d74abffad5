// `npm run db:stop`: stops clusters left running after a crash.
import { ensurePostgres, log, stopCluster } from "./lib/setup.mjs";

const bin = ensurePostgres();
let any = false;
for (const name of ["pg", process.env.STAGEWRIGHT_TEST_CLUSTER ?? "pg-test"]) any = stopCluster(bin, name) || any;
if (!any) log("No Stagewright PostgreSQL cluster was running.");
