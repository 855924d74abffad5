import { PageHeader } from "../components/ui/layout";
import { MailOutbox } from "../features/mail-outbox/mail-outbox";

/** Development only. Readable signed out too: password-reset mail is read before signing in. */
export function MailOutboxPage() {
  return (
    <>
      <title>Mail outbox · Stagewright</title>
      <PageHeader title="Mail outbox" subtitle="E-mail the development server caught instead of sending." />
      <MailOutbox />
    </>
  );
}
