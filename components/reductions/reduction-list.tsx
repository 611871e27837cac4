import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import { Table, TableBody, TableCell, TableEmptyRow, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { ReductionDto } from "@/lib/reductions/reductions";
import { describeStage, OUTPUT_SIZE_LABEL, REGISTRATION_SHORT, STATE_TONES } from "./labels";
import type { ShownParams as StoredParams } from "./reduction-details";
import { formatDateTime } from "@/lib/format/dates";


function formatUtc(iso: string): string {
  return formatDateTime(iso);
}

/** A bracket set's reductions, newest first as given, each with its parameters, state and a link to its page. */
export function ReductionList({ reductions, caption = "Reductions of this bracket set", currentId }: { reductions: ReductionDto[]; caption?: string; currentId?: string }) {
  return (
    <Table caption={caption}>
      <TableHead>
        <TableRow>
          <TableHeader>Started</TableHeader>
          <TableHeader>Aligned on</TableHeader>
          <TableHeader>Structure filter</TableHeader>
          <TableHeader>Size</TableHeader>
          <TableHeader>Frames</TableHeader>
          <TableHeader>State</TableHeader>
          <TableHeader>
            <span className="sr-only">Link</span>
          </TableHeader>
        </TableRow>
      </TableHead>
      <TableBody>
        {reductions.length === 0 ? <TableEmptyRow colSpan={7}>No reductions yet.</TableEmptyRow> : null}
        {reductions.map((r) => {
          const p = r.params as StoredParams;
          return (
            <TableRow key={r.id}>
              <TableCell className="font-mono whitespace-nowrap">
                <time dateTime={r.createdAt}>{formatUtc(r.createdAt)}</time>
              </TableCell>
              <TableCell>{REGISTRATION_SHORT[p.registration ?? ""] ?? p.registration ?? "—"}</TableCell>
              <TableCell>
                {(p.filter ?? "—").toUpperCase()}
                {p.filterStrength !== undefined ? <span className="text-ink-muted">, strength {p.filterStrength}</span> : null}
              </TableCell>
              <TableCell>{OUTPUT_SIZE_LABEL(p.outputLongSidePx ?? 0)}</TableCell>
              <TableCell>{p.groupNumber ? `Group ${p.groupNumber}` : "All included"}</TableCell>
              <TableCell>
                <Badge tone={STATE_TONES[r.state]}>{r.state}</Badge>
                {r.state === "failed" && r.error ? <p className="mt-1 max-w-md text-sm text-danger">{r.error}</p> : null}
                {/* The page's own reduction shows its live progress above; another running one, its stage when the page was read. */}
                {r.state === "running" && r.id !== currentId ? (
                  <span className="ml-2 text-ink-muted">
                    {r.stage ? describeStage(r.stage) : "Starting"}, {Math.round(r.progress * 100)}%
                  </span>
                ) : null}
              </TableCell>
              <TableCell>
                {r.id === currentId ? (
                  <span className="text-ink-muted">This one</span>
                ) : (
                  <Link href={`/studio/reductions/${r.id}`}>
                    Open<span className="sr-only"> the reduction started {formatUtc(r.createdAt)}</span>
                  </Link>
                )}
              </TableCell>
            </TableRow>
          );
        })}
      </TableBody>
    </Table>
  );
}
