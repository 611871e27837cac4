import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { LadderStep } from "@/lib/astro/exposure";
import { describePhenomenon } from "@/lib/planner/exports";

/** One row per phenomenon, one column per ISO: the marked speed nearest the exposure. */
export function LadderTable({ steps, isos, fNumber }: { steps: LadderStep[]; isos: number[]; fNumber: number }) {
  const phenomena = [...new Set(steps.map((s) => s.phenomenon))];
  const at = (p: string, iso: number) => steps.find((s) => s.phenomenon === p && s.iso === iso);
  return (
    <Table caption={`Exposure ladder at f/${Number(fNumber.toFixed(1))} (NASA RP 1369, t = f² / (ISO × 2^Q))`}>
      <TableHead>
        <TableRow>
          <TableHeader>Phenomenon</TableHeader>
          <TableHeader>Q</TableHeader>
          {isos.map((iso) => (
            <TableHeader key={iso}>ISO {iso}</TableHeader>
          ))}
        </TableRow>
      </TableHead>
      <TableBody>
        {phenomena.map((p) => {
          const first = at(p, isos[0]);
          return (
            <TableRow key={p}>
              <TableCell>{describePhenomenon(p)}</TableCell>
              <TableCell className="font-mono">{first?.q}</TableCell>
              {isos.map((iso) => {
                const s = at(p, iso);
                return (
                  <TableCell key={iso} className="font-mono">
                    {s ? (s.nominal.label ? `${s.nominal.label} s` : `${s.exposureS.toPrecision(2)} s (off the dial)`) : ""}
                  </TableCell>
                );
              })}
            </TableRow>
          );
        })}
      </TableBody>
    </Table>
  );
}
