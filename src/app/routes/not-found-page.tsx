import { Link } from 'react-router-dom';

export default function NotFoundPage() {
  return (
    <div className="py-16 text-center">
      <h1 className="text-2xl font-semibold text-lamina-950">Page not found</h1>
      <p className="mt-2 text-sm text-slate-600">
        There is nothing at this address.
      </p>
      <Link to="/" className="mt-4 inline-block text-lamina-700 underline">
        Go to the home page
      </Link>
    </div>
  );
}
