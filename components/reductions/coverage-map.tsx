import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { CoverageView } from "@/lib/reductions/report-schema";

/**
 * Where the frames overlap: the small coverage map (black where no frame
 * contributed, white where every frame did) with its legend, and the pixel
 * counts by number of frames as a table.
 */
export function CoverageMap({ coverage, src }: { coverage: CoverageView; src: string }) {
  const total = coverage.pixelsByFrames.reduce((a, b) => a + b, 0) || 1;
  const uncovered = coverage.uncoveredFraction ?? coverage.pixelsByFrames[0] / total;
  const alt =
    `Coverage map: brighter where more of the ${coverage.frameCount} frames contributed. ` +
    `On average ${coverage.meanFrames?.toFixed(1) ?? "?"} frames per pixel; ${(uncovered * 100).toFixed(1)}% of the master has no frame.`;
  return (
    <div className="grid grid-cols-1 gap-6 md:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
      <figure className="flex flex-col gap-2">
        {/* eslint-disable-next-line @next/next/no-img-element -- a small output served by our own route */}
        <img src={src} alt={alt} width={coverage.map?.width} height={coverage.map?.height} className="h-auto w-full rounded-control border border-line bg-black [image-rendering:pixelated]" />
        <figcaption className="flex items-center gap-3 text-sm text-ink-muted">
          <span>no frame</span>
          <span aria-hidden="true" className="h-3 w-32 rounded-full border border-line bg-gradient-to-r from-black to-white" />
          <span>all {coverage.frameCount} frames</span>
        </figcaption>
      </figure>
      <Table caption="Master pixels by number of contributing frames">
        <TableHead>
          <TableRow>
            <TableHeader>Frames</TableHeader>
            <TableHeader>Pixels</TableHeader>
            <TableHeader>Share</TableHeader>
          </TableRow>
        </TableHead>
        <TableBody>
          {coverage.pixelsByFrames.map((n, k) => (
            <TableRow key={k}>
              <TableCell className="font-mono">{k}</TableCell>
              <TableCell className="font-mono">{n.toLocaleString("en")}</TableCell>
              <TableCell className="font-mono">{((n / total) * 100).toFixed(1)}%</TableCell>
            </TableRow>
          ))}
        </TableBody>
      </Table>
    </div>
  );
}
