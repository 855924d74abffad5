import type { Router } from "express";
import { InvitationCreateSchema, MemberUpdateSchema, StudyCreateSchema, StudyUpdateSchema } from "../../shared/schemas/studies";
import { ActivityQuerySchema } from "../../shared/schemas/review";
import type { AppDeps } from "../app";
import { currentUser, signedIn, studyAccess, studyRole, uuidParam } from "../auth/authorize";
import { acceptInvitation, createInvitation, listInvitations, previewInvitation, revokeInvitation } from "../services/invitations";
import { changeMemberRole, createStudy, getStudy, listActivity, listMembers, listStudies, removeMember, updateStudy } from "../services/studies";

export function studyRoutes(r: Router, deps: AppDeps): void {
  const { db } = deps;
  // Read at request time: the public address can be set after start-up (tests listen on port 0).
  const mailDeps = () => ({ mailer: deps.mailer, publicUrl: deps.config.publicUrl, secret: deps.config.sessionSecret });

  r.get("/studies", signedIn, async (req, res) => {
    res.json(await listStudies(db, currentUser(req).id));
  });

  r.post("/studies", signedIn, async (req, res) => {
    res.status(201).json(await createStudy(db, currentUser(req).id, StudyCreateSchema.parse(req.body)));
  });

  r.get("/studies/:studyId", studyRole(db, "viewer"), async (req, res) => {
    res.json(await getStudy(db, studyAccess(res).studyId, currentUser(req).id));
  });

  r.patch("/studies/:studyId", studyRole(db, "owner"), async (req, res) => {
    res.json(await updateStudy(db, studyAccess(res).studyId, currentUser(req).id, StudyUpdateSchema.parse(req.body)));
  });

  r.get("/studies/:studyId/members", studyRole(db, "viewer"), async (_req, res) => {
    res.json(await listMembers(db, studyAccess(res).studyId));
  });

  r.patch("/studies/:studyId/members/:userId", studyRole(db, "owner"), async (req, res) => {
    const input = MemberUpdateSchema.parse(req.body);
    res.json(await changeMemberRole(db, studyAccess(res).studyId, currentUser(req).id, uuidParam(req, "userId"), input));
  });

  // Owners remove anyone; any member may remove themselves (leave). The service checks which.
  r.delete("/studies/:studyId/members/:userId", studyRole(db, "viewer"), async (req, res) => {
    const { studyId, role } = studyAccess(res);
    await removeMember(db, studyId, currentUser(req).id, role, uuidParam(req, "userId"));
    res.status(204).end();
  });

  r.get("/studies/:studyId/invitations", studyRole(db, "owner"), async (_req, res) => {
    res.json(await listInvitations(db, studyAccess(res).studyId));
  });

  r.post("/studies/:studyId/invitations", studyRole(db, "owner"), async (req, res) => {
    const input = InvitationCreateSchema.parse(req.body);
    res.status(201).json(await createInvitation(db, mailDeps(), studyAccess(res).studyId, currentUser(req), input));
  });

  r.delete("/studies/:studyId/invitations/:invitationId", studyRole(db, "owner"), async (req, res) => {
    await revokeInvitation(db, studyAccess(res).studyId, currentUser(req).id, uuidParam(req, "invitationId"));
    res.status(204).end();
  });

  r.get("/studies/:studyId/activity", studyRole(db, "viewer"), async (req, res) => {
    res.json(await listActivity(db, studyAccess(res).studyId, ActivityQuerySchema.parse(req.query)));
  });

  // The link in the e-mail is the credential: anyone holding it may see what it offers.
  r.get("/invitations/:token", async (req, res) => {
    res.json(await previewInvitation(db, String(req.params.token)));
  });

  r.post("/invitations/:token/accept", signedIn, async (req, res) => {
    const token = String(req.params.token);
    res.json(await db.transaction((tx) => acceptInvitation(tx, token, currentUser(req))));
  });
}
