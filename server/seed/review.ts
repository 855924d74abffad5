import { and, eq } from "drizzle-orm";
import type { DbOrTx } from "../db/client";
import { lifeCycles, snapshots } from "../db/schema";
import { addReply, startThread, type Actor } from "../services/comments";
import { askForReview, recordDecision } from "../services/reviews";

/**
 * The demo's review trail: the demo reviewer's comments on both life cycles,
 * an editor's reply, review requests and the decisions. Written through the
 * services (activity rows included); the demo sends no e-mail.
 */
export async function seedReview(tx: DbOrTx, studyId: string, people: { editor: Actor; reviewer: Actor }): Promise<void> {
  const { editor, reviewer } = people;
  const lc = async (name: string) => {
    const [row] = await tx.select().from(lifeCycles).where(and(eq(lifeCycles.studyId, studyId), eq(lifeCycles.name, name)));
    const [snap] = await tx.select().from(snapshots).where(eq(snapshots.lifeCycleId, row!.id));
    return { lifeCycleId: row!.id, snapshotId: snap!.id };
  };
  const kessel = await lc("Kessel Marsh newts");
  const brannock = await lc("Brannock Fen newts");
  const scopeK = { studyId, lifeCycleId: kessel.lifeCycleId };
  const scopeB = { studyId, lifeCycleId: brannock.lifeCycleId };

  const adult = await startThread(tx, scopeK, reviewer, {
    anchor: { kind: "transition", id: "tr_adult_adult" },
    body:
      "Adult survival carries most of the elasticity here. The 0.70 comes from recaptures at **one** breeding pond; were the other two ponds sampled in the later seasons? " +
      "If not, please say so in the rate's source note.",
  });
  await addReply(tx, studyId, editor, adult.result.id, {
    body: "Only the north pond was trapped before 2019. I'll add that to the source of s_a and rerun the estimate with the three-pond seasons only.",
  });
  await startThread(tx, scopeK, reviewer, {
    anchor: { kind: "rate", id: "vr_se" },
    body: "Egg-to-census survival of 0.03 looks low beside Brannock Fen's 0.035 with a similar SE. Is the difference real, or a sampling artefact of the drier years?",
  });
  await startThread(tx, scopeK, reviewer, {
    anchor: { kind: "cell", to: "st_eft", from: "st_adult" },
    body: "The fertility entry assumes a 1:1 sex ratio at hatching. Fine for now, but cite the clutch sexing if you have it.",
  });
  const fen = await startThread(tx, scopeB, reviewer, {
    anchor: { kind: "lifeCycle" },
    body: "Structure and census timing read well: pre-breeding census, females only, fertility as m × 0.5 × s_e.",
  });
  await addReply(tx, studyId, editor, fen.result.id, { body: "Thanks, Rowan." });

  await askForReview(tx, scopeK, editor, { snapshotId: kessel.snapshotId, reviewerIds: [reviewer.id], message: "Ready for a first look before the site report." });
  await recordDecision(tx, scopeK, reviewer, {
    snapshotId: kessel.snapshotId,
    decision: "changes_requested",
    summary: "The structure is sound; adult survival needs a note on which ponds were sampled before I can approve (see my comment on the adult stasis arrow).",
  });
  await askForReview(tx, scopeB, editor, { snapshotId: brannock.snapshotId, reviewerIds: [reviewer.id] });
  await recordDecision(tx, scopeB, reviewer, { snapshotId: brannock.snapshotId, decision: "approved", summary: "Rates, sources and structure check out. Approved as the baseline for the Brannock Fen report." });
}
