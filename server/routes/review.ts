import type { Request, Response, Router } from "express";
import {
  CommentCreateSchema,
  CommentReplySchema,
  CommentUpdateSchema,
  NotificationPreferencesSchema,
  ReviewDecisionSchema,
  ReviewRequestCreateSchema,
  UnsubscribeSchema,
} from "../../shared/schemas/review";
import type { Role } from "../../shared/schemas/studies";
import type { AppDeps } from "../app";
import { currentUser, roleCheck, signedIn, studyAccess, uuidParam } from "../auth/authorize";
import { createThread, deleteComment, editComment, lifeCycleOfComment, listThreads, replyToComment, setResolved, type Actor } from "../services/comments";
import { studyOfLifeCycle } from "../services/life-cycles";
import { notificationMode, setNotificationMode, unsubscribe, type NotifyDeps } from "../services/notifications";
import { decideReview, lifeCycleReviews, requestReview } from "../services/reviews";

/** Comments, reviews and e-mail preferences. Reviewers comment and review; editors ask for reviews; viewers read. */
export function reviewRoutes(r: Router, deps: AppDeps): void {
  const { db } = deps;
  // Read at request time: the public address can be set after start-up (tests listen on port 0).
  const notify = (): NotifyDeps => ({ mailer: deps.mailer, publicUrl: deps.config.publicUrl, secret: deps.config.sessionSecret });
  const lifeCycleRole = (role: Role) => roleCheck(db, role, (req) => studyOfLifeCycle(db, uuidParam(req, "lifeCycleId")));
  const commentRole = (role: Role) =>
    roleCheck(db, role, async (req) => {
      const lifeCycleId = await lifeCycleOfComment(db, uuidParam(req, "commentId"));
      return lifeCycleId ? studyOfLifeCycle(db, lifeCycleId) : null;
    });
  const actor = (req: Request, res: Response): Actor => {
    const user = currentUser(req);
    return { id: user.id, name: user.name, role: studyAccess(res).role };
  };
  const scope = (req: Request, res: Response) => ({ studyId: studyAccess(res).studyId, lifeCycleId: uuidParam(req, "lifeCycleId") });

  r.get("/life-cycles/:lifeCycleId/comments", lifeCycleRole("viewer"), async (req, res) => {
    res.json(await listThreads(db, uuidParam(req, "lifeCycleId")));
  });

  r.post("/life-cycles/:lifeCycleId/comments", lifeCycleRole("reviewer"), async (req, res) => {
    const input = CommentCreateSchema.parse(req.body);
    res.status(201).json(await createThread(db, notify(), scope(req, res), actor(req, res), input));
  });

  r.post("/comments/:commentId/replies", commentRole("reviewer"), async (req, res) => {
    const input = CommentReplySchema.parse(req.body);
    res.status(201).json(await replyToComment(db, notify(), studyAccess(res).studyId, actor(req, res), uuidParam(req, "commentId"), input));
  });

  r.patch("/comments/:commentId", commentRole("reviewer"), async (req, res) => {
    const input = CommentUpdateSchema.parse(req.body);
    res.json(await editComment(db, notify(), studyAccess(res).studyId, actor(req, res), uuidParam(req, "commentId"), input));
  });

  r.delete("/comments/:commentId", commentRole("reviewer"), async (req, res) => {
    await deleteComment(db, studyAccess(res).studyId, actor(req, res), uuidParam(req, "commentId"));
    res.status(204).end();
  });

  r.post("/comments/:commentId/resolve", commentRole("reviewer"), async (req, res) => {
    res.json(await setResolved(db, studyAccess(res).studyId, actor(req, res), uuidParam(req, "commentId"), true));
  });

  r.post("/comments/:commentId/reopen", commentRole("reviewer"), async (req, res) => {
    res.json(await setResolved(db, studyAccess(res).studyId, actor(req, res), uuidParam(req, "commentId"), false));
  });

  r.get("/life-cycles/:lifeCycleId/reviews", lifeCycleRole("viewer"), async (req, res) => {
    res.json(await lifeCycleReviews(db, uuidParam(req, "lifeCycleId")));
  });

  r.post("/life-cycles/:lifeCycleId/reviews", lifeCycleRole("editor"), async (req, res) => {
    const input = ReviewRequestCreateSchema.parse(req.body);
    res.status(201).json(await requestReview(db, notify(), scope(req, res), actor(req, res), input));
  });

  r.post("/life-cycles/:lifeCycleId/reviews/decision", lifeCycleRole("reviewer"), async (req, res) => {
    const input = ReviewDecisionSchema.parse(req.body);
    res.json(await decideReview(db, notify(), scope(req, res), actor(req, res), input));
  });

  r.get("/account/notifications", signedIn, async (req, res) => {
    res.json({ mode: await notificationMode(db, currentUser(req).id) });
  });

  r.put("/account/notifications", signedIn, async (req, res) => {
    const { mode } = NotificationPreferencesSchema.parse(req.body);
    res.json(await setNotificationMode(db, currentUser(req).id, mode));
  });

  // The signed token in the e-mail is the credential: no sign-in needed to stop e-mail.
  r.post("/notifications/unsubscribe", async (req, res) => {
    const { token } = UnsubscribeSchema.parse(req.body);
    res.json(await unsubscribe(db, deps.config.sessionSecret, token));
  });
}
