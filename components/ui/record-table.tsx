import Link from "next/link";
import type { ReactNode } from "react";
import { EmptyState } from "@/components/ui/empty-state";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";

export interface RecordColumn<T> {
  header: string;
  cell: (row: T) => ReactNode;
  className?: string;
}

/** A column whose cell links to the record's own page, named by `name`. */
export function linkColumn<T>(header: string, href: (row: T) => string, name: (row: T) => ReactNode): RecordColumn<T> {
  return { header, cell: (row) => <Link href={href(row)}>{name(row)}</Link> };
}

/**
 * A plain list of records as a table, one row each with a cell per column, or
 * what to do when there are none yet. For lists the server renders whole; the
 * sortable and filterable tables use TanStack Table.
 */
export function RecordTable<T extends { id: string }>({
  caption,
  captionHidden,
  columns,
  rows,
  empty,
}: {
  caption: string;
  captionHidden?: boolean;
  columns: RecordColumn<T>[];
  rows: T[];
  empty: { title: ReactNode; message: ReactNode };
}) {
  if (rows.length === 0) return <EmptyState title={empty.title} message={empty.message} />;
  return (
    <Table caption={caption} captionHidden={captionHidden}>
      <TableHead>
        <TableRow>
          {columns.map((c) => (
            <TableHeader key={c.header}>{c.header}</TableHeader>
          ))}
        </TableRow>
      </TableHead>
      <TableBody>
        {rows.map((row) => (
          <TableRow key={row.id}>
            {columns.map((c) => (
              <TableCell key={c.header} className={c.className}>
                {c.cell(row)}
              </TableCell>
            ))}
          </TableRow>
        ))}
      </TableBody>
    </Table>
  );
}
