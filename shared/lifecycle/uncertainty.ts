/**
 * Uncertainty of vital rates in the life-cycle document (version 2): counts
 * behind a probability, an explicit distribution, and sampling correlations
 * between rates. The standard error (`se`) and confidence interval (`ci`)
 * stay on the rate itself (schema.ts).
 */
import { z } from "zod";
import { ID_PATTERN } from "./ids";

const IdSchema = z.string({ error: "An id is text." }).regex(ID_PATTERN, "An id is 1 to 64 letters, digits, _ or -.");
const positive = (what: string) => z.number({ error: `${what} is a finite number.` }).gt(0, `${what} is above 0.`);

/** k of n individuals did it (survived, grew…): the binomial data behind a probability. */
export const RateCountsSchema = z
  .strictObject({
    k: z.number({ error: "k is a whole number." }).int("k is a whole number.").min(0, "k cannot be negative."),
    n: z.number({ error: "n is a whole number." }).int("n is a whole number.").min(1, "n is at least 1."),
  })
  .refine((c) => c.k <= c.n, { path: ["k"], message: "k (individuals that did it) cannot exceed n (individuals at risk)." });

/** An explicit distribution of a rate's value: beta for probabilities, lognormal or gamma for positive rates. */
export const RateDistributionSchema = z.discriminatedUnion(
  "family",
  [
    z.strictObject({ family: z.literal("beta"), alpha: positive("α"), beta: positive("β") }),
    z.strictObject({ family: z.literal("lognormal"), meanlog: z.number({ error: "The mean of the log is a finite number." }), sdlog: positive("The SD of the log") }),
    z.strictObject({ family: z.literal("gamma"), shape: positive("The shape"), rate: positive("The rate parameter") }),
  ],
  { error: 'The distribution family is "beta", "lognormal" or "gamma".' },
);

/** Correlation between the sampling errors of two rates (by rate id). */
export const RateCorrelationSchema = z.strictObject({
  a: IdSchema,
  b: IdSchema,
  r: z
    .number({ error: "A correlation is a finite number." })
    .min(-1, "A correlation lies between −1 and 1.")
    .max(1, "A correlation lies between −1 and 1."),
});

export type RateCounts = z.infer<typeof RateCountsSchema>;
export type RateDistribution = z.infer<typeof RateDistributionSchema>;
export type RateCorrelation = z.infer<typeof RateCorrelationSchema>;

type Issue = (path: (string | number)[], message: string) => void;

interface UncertaintyFields {
  rates: readonly { id: string; name: string }[];
  correlations?: readonly RateCorrelation[] | undefined;
}

/** Cross-field rules: correlations name existing, distinct rates, each pair once. */
export function checkUncertaintyRules(doc: UncertaintyFields, issue: Issue): void {
  const names = new Map(doc.rates.map((r) => [r.id, r.name]));
  const pairs = new Map<string, number>();
  doc.correlations?.forEach((c, i) => {
    const at = (field: string) => ["correlations", i, field];
    if (!names.has(c.a)) issue(at("a"), `No vital rate has the id "${c.a}".`);
    if (!names.has(c.b)) issue(at("b"), `No vital rate has the id "${c.b}".`);
    if (c.a === c.b) issue(at("b"), `A correlation joins two different rates; both ends are "${names.get(c.a) ?? c.a}".`);
    const key = [c.a, c.b].sort().join("\u0000");
    const first = pairs.get(key);
    if (first !== undefined) issue(["correlations", i], `correlations.${first} already gives the correlation of "${names.get(c.a) ?? c.a}" and "${names.get(c.b) ?? c.b}".`);
    else pairs.set(key, i);
  });
}
