import type { ReactNode } from "react";

/** The title block of a page: one h1, an optional line under it and actions on the right. */
export function PageHeader({ title, subtitle, actions, eyebrow }: { title: ReactNode; subtitle?: ReactNode; actions?: ReactNode; eyebrow?: ReactNode }) {
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4 border-b border-ink/15 pb-4">
      <div className="min-w-0 space-y-1">
        {eyebrow && <div className="text-sm text-ink/75">{eyebrow}</div>}
        <h1 className="text-3xl font-bold break-words">{title}</h1>
        {subtitle && <div className="text-ink/80">{subtitle}</div>}
      </div>
      {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
    </div>
  );
}

/** A titled block of a page (a panel). */
export function Section({ title, description, actions, children, headingLevel = 2, id }: {
  title: string;
  description?: ReactNode;
  actions?: ReactNode;
  children: ReactNode;
  headingLevel?: 2 | 3;
  id?: string;
}) {
  const Heading = headingLevel === 2 ? "h2" : "h3";
  return (
    <section id={id} className="rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
      <div className="mb-3 flex flex-wrap items-start justify-between gap-3">
        <div className="space-y-1">
          <Heading className="text-xl font-bold">
            {title}
          </Heading>
          {description && <div className="text-sm text-ink/75">{description}</div>}
        </div>
        {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
      </div>
      {children}
    </section>
  );
}

/** A narrow centred card for the sign-in family of pages. */
export function NarrowCard({ title, children, footer }: { title: string; children: ReactNode; footer?: ReactNode }) {
  return (
    <div className="mx-auto w-full max-w-md py-8">
      <div className="rounded-lg border border-ink/15 bg-white p-6 shadow-sm sm:p-8">
        <h1 className="mb-6 text-2xl font-bold">{title}</h1>
        {children}
      </div>
      {footer && <div className="mt-4 space-y-2 text-center">{footer}</div>}
    </div>
  );
}
