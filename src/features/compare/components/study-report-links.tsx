const LINK =
  'rounded-lg px-3 py-2 text-lamina-800 ring-1 ring-lamina-300 hover:bg-lamina-50';

/**
 * Download links of one study: its results as CSV (any study the viewer
 * can see) and its PDF report (signed studies only; the server refuses an
 * unsigned one).
 */
export function StudyReportLinks({
  studyId,
  isSigned,
}: {
  studyId: number;
  isSigned: boolean;
}) {
  return (
    <>
      <a className={LINK} href={`/api/studies/${studyId}/results.csv`} download>
        Results CSV
      </a>
      {isSigned && (
        <a
          className={LINK}
          href={`/api/studies/${studyId}/report.pdf`}
          download
        >
          PDF report
        </a>
      )}
    </>
  );
}
