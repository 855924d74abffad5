import cluster from "node:cluster";
import { ClusterMemoryStoreWorker } from "@express-rate-limit/cluster-memory-store";
import type { Options } from "express-rate-limit";

/**
 * Where a rate limiter counts. When the web server runs as several processes
 * (server/index.ts), the counts live in the cluster's primary so a limit holds
 * across all of them; otherwise in this process (express-rate-limit's default).
 * `prefix` keeps each limiter's counts apart.
 */
export function rateLimitStore(prefix: string): Pick<Options, "store"> | Record<string, never> {
  return cluster.isWorker ? { store: new ClusterMemoryStoreWorker({ prefix }) } : {};
}
