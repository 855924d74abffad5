import { PageHeader } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { ApiGuide } from "../features/api-guide";
import { paths } from "./paths";

/** The API for scripts: how to authenticate, then every route. */
export function ApiGuidePage() {
  return (
    <>
      <title>API · Stagewright</title>
      <PageHeader title="API for scripts" subtitle="Every route the web app uses is open to your scripts, with the same rules." />
      <ApiGuide
        intro={
          <>
            <p>
              Send <code className="font-mono">Authorization: Bearer &lt;token&gt;</code> with a personal API token from <TextLink to={paths.settings()}>Settings</TextLink>. A{" "}
              <strong>read</strong> token may call GET routes and the computations that store nothing (analysis, levers, LTRE); a <strong>read-write</strong> token may do everything your role in each Study allows.
              An expired or revoked token gets 401; a token whose scope is too narrow gets 403.
            </p>
            <p>
              Errors are JSON: <code className="font-mono">{`{ "error": { "code", "message", "fields": [{ "path", "message" }] } }`}</code>; a 400 names each field that is wrong.
              The README has curl and Python examples.
            </p>
          </>
        }
      />
    </>
  );
}
