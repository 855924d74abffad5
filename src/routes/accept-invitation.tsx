import { useParams } from "react-router";
import { NarrowCard } from "../components/ui/layout";
import { InvitationLanding } from "../features/invitations/invitation-landing";

export function AcceptInvitationPage() {
  const { token = "" } = useParams();
  return (
    <NarrowCard title="You are invited to a Study">
      <title>Invitation · Stagewright</title>
      <InvitationLanding token={token} />
    </NarrowCard>
  );
}
