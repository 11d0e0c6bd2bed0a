import { Link } from 'react-router-dom';

/** Links to the neighbouring pages, drawn as outlined buttons. */
export function PageLinks({
  links,
}: {
  links: readonly { to: string; label: string }[];
}) {
  return (
    <div className="flex gap-3 text-sm">
      {links.map((link) => (
        <Link
          key={link.to}
          to={link.to}
          className="rounded-lg px-3 py-2 text-lamina-800 ring-1 ring-lamina-300 hover:bg-lamina-50"
        >
          {link.label}
        </Link>
      ))}
    </div>
  );
}
