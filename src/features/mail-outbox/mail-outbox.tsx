import { Fragment } from "react";
import type { MailMessage } from "../../../shared/schemas";
import { isApiError } from "../../api/client";
import { useMail } from "../../api/mail";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { textLinkClasses } from "../../components/ui/text-link";
import { DateTime, RelativeTime } from "../../components/ui/time";

const URL_PATTERN = /(https?:\/\/[^\s<>"')\]]+)/g;

/** Message text with every web address made clickable. */
function LinkedText({ text }: { text: string }) {
  const parts = text.split(URL_PATTERN);
  return (
    <>
      {parts.map((part, index) =>
        index % 2 === 1 ? (
          <a key={index} href={part} className={`${textLinkClasses} break-all`}>
            {part}
          </a>
        ) : (
          <Fragment key={index}>{part}</Fragment>
        ),
      )}
    </>
  );
}

function Message({ message }: { message: MailMessage }) {
  return (
    <article className="rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
      <header className="mb-3 space-y-1">
        <h2 className="text-lg font-bold break-words">
          {message.subject}
        </h2>
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 text-sm">
          <dt className="text-ink/75">To</dt>
          <dd className="break-all">{message.to}</dd>
          <dt className="text-ink/75">From</dt>
          <dd className="break-all">{message.from}</dd>
          <dt className="text-ink/75">Received</dt>
          <dd>
            <DateTime iso={message.receivedAt} /> (<RelativeTime iso={message.receivedAt} />)
          </dd>
        </dl>
      </header>
      <div className="rounded border border-ink/10 bg-paper p-3 text-sm whitespace-pre-wrap">
        <LinkedText text={message.text} />
      </div>
      {message.links.length > 0 && (
        <div className="mt-3">
          <h3 className="text-sm font-bold">Links in this message</h3>
          <ul className="mt-1 space-y-1 text-sm">
            {message.links.map((link) => (
              <li key={link}>
                <a href={link} className={`${textLinkClasses} break-all`}>
                  {link}
                </a>
              </li>
            ))}
          </ul>
        </div>
      )}
    </article>
  );
}

/** Development only: e-mail caught by the local mail fake, newest first. */
export function MailOutbox() {
  const mail = useMail();

  if (mail.isPending) return <Loading label="Loading the outbox…" />;
  if (mail.isError) {
    if (isApiError(mail.error) && mail.error.status === 404) {
      return (
        <Alert tone="info" title="The mail outbox is off.">
          It exists only on development servers, where e-mail is caught instead of sent.
        </Alert>
      );
    }
    return <QueryError error={mail.error} what="the outbox" onRetry={() => mail.refetch()} />;
  }

  const messages = [...mail.data].sort((a, b) => b.receivedAt.localeCompare(a.receivedAt));

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <p role="status" className="text-ink/80">
          {messages.length === 0 ? "No messages caught yet." : `${messages.length} ${messages.length === 1 ? "message" : "messages"}`}
          {" · refreshes every few seconds"}
        </p>
        <Button variant="secondary" size="sm" onClick={() => mail.refetch()}>
          Refresh
        </Button>
      </div>
      {messages.map((message) => (
        <Message key={message.id} message={message} />
      ))}
    </div>
  );
}
