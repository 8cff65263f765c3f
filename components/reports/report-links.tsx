import Link from 'next/link';

/** The two forms of a review pack: the printable page and the PDF made on the server. */
export function ReportLinks({ page, pdf }: { page: string; pdf: string }) {
  return (
    <span className="inline-flex gap-2" data-testid="report-links">
      <Link className="btn btn-quiet no-underline" href={page}>
        Report
      </Link>
      <a className="btn btn-quiet no-underline" href={pdf} download>
        PDF
      </a>
    </span>
  );
}
