import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { TimelineEvent } from "@/lib/planner/plan";

function clock(utcMs: number, timeZone: string): string {
  return new Intl.DateTimeFormat("en-GB", { timeZone, hour: "2-digit", minute: "2-digit", second: "2-digit", hourCycle: "h23" }).format(utcMs);
}

function relative(s: number | null): string {
  if (s === null) return "";
  const sign = s < 0 ? "−" : "+";
  const a = Math.abs(s);
  return `C2 ${sign}${Math.floor(a / 60)}:${String(a % 60).padStart(2, "0")}`;
}

export function TimelineTable({ events, timeZone }: { events: TimelineEvent[]; timeZone: string }) {
  const zoneLabel = timeZone === "UTC" ? "" : timeZone;
  return (
    <Table caption="Timeline">
      <TableHead>
        <TableRow>
          <TableHeader>Event</TableHeader>
          <TableHeader>UTC</TableHeader>
          {zoneLabel ? <TableHeader>Local ({zoneLabel})</TableHeader> : null}
          <TableHeader>From second contact</TableHeader>
          <TableHeader>Sun altitude</TableHeader>
          <TableHeader>What to do</TableHeader>
        </TableRow>
      </TableHead>
      <TableBody>
        {events.map((e) => (
          <TableRow key={e.key}>
            <TableCell>{e.label}</TableCell>
            <TableCell className="font-mono">{clock(e.utcMs, "UTC")}</TableCell>
            {zoneLabel ? <TableCell className="font-mono">{clock(e.utcMs, timeZone)}</TableCell> : null}
            <TableCell className="font-mono">{relative(e.fromSecondContactS)}</TableCell>
            <TableCell className="font-mono">{e.sunAltDeg.toFixed(1)}°</TableCell>
            <TableCell className="text-sm">{e.advice}</TableCell>
          </TableRow>
        ))}
      </TableBody>
    </Table>
  );
}
