import { Fragment, type ReactNode } from 'react';
import { Link } from 'react-router-dom';

interface BreadcrumbsProps {
  /** The pages above this one, outermost first. */
  trail: readonly { to: string; label: ReactNode }[];
  /** This page's own name. */
  current: ReactNode;
}

/** Where the page sits: links to the pages above it, then its name. */
export function Breadcrumbs({ trail, current }: BreadcrumbsProps) {
  return (
    <p className="text-sm">
      {trail.map((step) => (
        <Fragment key={step.to}>
          <Link to={step.to} className="text-lamina-700 underline">
            {step.label}
          </Link>{' '}
          /{' '}
        </Fragment>
      ))}
      {current}
    </p>
  );
}
