import { isApiError } from "../../api/client";
import { Alert } from "./alert";
import { Button } from "./button";

/** A panel's data failed to load: say what went wrong and offer another try. */
export function QueryError({ error, what, onRetry }: { error: unknown; what: string; onRetry?: () => void }) {
  const message = isApiError(error) || error instanceof Error ? error.message : "Something went wrong.";
  return (
    <Alert tone="error" title={`Could not load ${what}.`}>
      <p>{message}</p>
      {onRetry && (
        <Button variant="secondary" size="sm" className="mt-2" onClick={onRetry}>
          Try again
        </Button>
      )}
    </Alert>
  );
}
