import { Link } from 'react-router';

export function StatusPage({ title, message, code }: { title: string; message: string; code?: number }) {
  return (
    <div className="mx-auto max-w-lg p-8 text-center">
      {code && <p className="text-5xl font-bold text-ink-300">{code}</p>}
      <h1 className="page-title mt-2">{title}</h1>
      <p className="mt-2 text-ink-700">{message}</p>
      <Link to="/" className="btn-ghost mt-6">Back to my home</Link>
    </div>
  );
}
