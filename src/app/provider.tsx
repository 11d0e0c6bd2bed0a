import { QueryClientProvider } from '@tanstack/react-query';
import { Component, type ErrorInfo, type ReactNode } from 'react';
import { queryClient } from '../lib/query-client.ts';

/** Catches render errors of one region so the rest of the app keeps working. */
export class ErrorBoundary extends Component<
  { children: ReactNode; label: string },
  { failed: boolean }
> {
  state = { failed: false };

  static getDerivedStateFromError() {
    return { failed: true };
  }

  componentDidCatch(error: Error, info: ErrorInfo) {
    console.error(`${this.props.label} failed`, error, info.componentStack);
  }

  render() {
    if (this.state.failed) {
      return (
        <div
          role="alert"
          className="m-6 rounded-lg border border-red-200 bg-red-50 p-4 text-sm text-red-800"
        >
          This part of the page ({this.props.label}) failed to display. Reload
          the page to try again.
        </div>
      );
    }
    return this.props.children;
  }
}

export function AppProvider({ children }: { children: ReactNode }) {
  return (
    <QueryClientProvider client={queryClient}>
      <ErrorBoundary label="Lamella">{children}</ErrorBoundary>
    </QueryClientProvider>
  );
}
