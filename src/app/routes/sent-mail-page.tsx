import { Fragment } from 'react';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { useSentMail } from '../../features/admin/api/sent-mail.ts';

const URL_PATTERN = /(https?:\/\/[^\s]+)/g;

/** Shows a plain-text body with its links clickable. */
function LinkedText({ text }: { text: string }) {
  return (
    <>
      {text.split(URL_PATTERN).map((part, i) =>
        i % 2 === 1 ? (
          <a
            key={i}
            href={part}
            className="break-all text-lamina-700 underline"
          >
            {part}
          </a>
        ) : (
          <Fragment key={i}>{part}</Fragment>
        ),
      )}
    </>
  );
}

export default function SentMailPage() {
  const mail = useSentMail();
  return (
    <div className="space-y-6">
      <PageTitle>Sent mail</PageTitle>
      <p className="text-sm text-slate-600">
        Messages received by Lamella&apos;s local mail server. In a deployment
        with an SMTP relay this list stays empty.
      </p>
      {mail.isPending && <Loading what="mail" />}
      {mail.isError && (
        <ErrorNotice error={mail.error} onRetry={() => void mail.refetch()} />
      )}
      {mail.data && mail.data.length === 0 && (
        <Empty>No mail has been sent yet.</Empty>
      )}
      <ul className="space-y-4">
        {mail.data?.map((m) => (
          <li
            key={m.id}
            className="rounded-xl bg-white p-4 shadow-sm"
            data-testid="sent-mail-item"
          >
            <p className="font-semibold">{m.subject}</p>
            <p className="text-xs text-slate-500">
              To {m.to.join(', ')} · {new Date(m.receivedAt).toLocaleString()}
            </p>
            <pre className="mt-3 whitespace-pre-wrap font-sans text-sm text-slate-800">
              <LinkedText text={m.text} />
            </pre>
          </li>
        ))}
      </ul>
    </div>
  );
}
