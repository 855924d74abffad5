/**
 * A nested error boundary for one risky part of a page (an editor tab, a
 * chart): if it throws while rendering, only that part shows what went wrong
 * and offers another try; the rest of the page keeps working.
 */
import { Component, type ErrorInfo, type ReactNode } from "react";
import { Alert } from "./alert";
import { Button } from "./button";

type ErrorBoundaryProps = {
  /** What failed, for the message ("the Results tab"). */
  what: string;
  children: ReactNode;
  /** Changing this value clears a caught error (e.g. the document's revision). */
  resetKey?: unknown;
};

type ErrorBoundaryState = { error: Error | null; resetKey: unknown };

export class ErrorBoundary extends Component<ErrorBoundaryProps, ErrorBoundaryState> {
  override state: ErrorBoundaryState = { error: null, resetKey: this.props.resetKey };

  static getDerivedStateFromError(error: unknown): Partial<ErrorBoundaryState> {
    return { error: error instanceof Error ? error : new Error(String(error)) };
  }

  static getDerivedStateFromProps(props: ErrorBoundaryProps, state: ErrorBoundaryState): Partial<ErrorBoundaryState> | null {
    return props.resetKey !== state.resetKey ? { error: null, resetKey: props.resetKey } : null;
  }

  override componentDidCatch(error: Error, info: ErrorInfo): void {
    // Kept in the console for whoever debugs it; the person sees the message below.
    console.error(`Error in ${this.props.what}:`, error, info.componentStack);
  }

  override render(): ReactNode {
    const { error } = this.state;
    if (!error) return this.props.children;
    const stale = /dynamically imported module|Importing a module script failed/i.test(error.message);
    return (
      <Alert tone="error" title={`Could not show ${this.props.what}.`}>
        <p>{stale ? "Part of this page belongs to an older version of Stagewright. Reload the page to get the new one." : error.message}</p>
        <Button variant="secondary" size="sm" className="mt-2" onClick={() => (stale ? window.location.reload() : this.setState({ error: null }))}>
          {stale ? "Reload the page" : "Try again"}
        </Button>
      </Alert>
    );
  }
}
