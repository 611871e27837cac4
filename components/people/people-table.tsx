"use client";
// The people on the admin page: name, address, joining date, the roles (each a
// switch) and whether they may sign in. The list is found, filtered and paged
// on the server, through the address; TanStack Table lays out its columns and
// rows. On a phone the address and the date sit under the name.
import { createColumnHelper, metaHelper, tableFeatures, useTable } from "@tanstack/react-table";
import { Badge } from "@/components/ui/badge";
import { Table, TableBody, TableCell, TableEmptyRow, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { ROLE_LABELS, ROLES } from "@/lib/auth/roles";
import { formatDate } from "@/lib/format/dates";
import type { FormAction } from "@/lib/http/action-result";
import type { PersonDto } from "@/lib/people/people";
import { DisablePerson } from "./disable-person";
import { RoleSwitch } from "./role-switch";

interface PeopleTableMeta {
  /** The admin looking at the list: they cannot revoke their own admin role nor disable themselves. */
  selfId: string;
  changeRole: FormAction;
  setDisabled: FormAction;
}

const features = tableFeatures({
  /** Classes of the column's header and of its cells. */
  columnMeta: metaHelper<{ head?: string; cell?: string }>(),
  tableMeta: metaHelper<PeopleTableMeta>(),
});

/** The address and the date show in their own columns on wide screens only. */
const ON_WIDE_SCREENS = "hidden md:table-cell";

const col = createColumnHelper<typeof features, PersonDto>();
const COLUMNS = col.columns([
  col.accessor("name", {
    header: "Name",
    cell: ({ row }) => {
      const p = row.original;
      return (
        <>
          {p.name} {p.emailVerified ? null : <Badge tone="warn">address not confirmed</Badge>} {p.disabledAt ? <Badge tone="danger">disabled</Badge> : null}
          {/* On a phone the address and the date sit under the name, so the roles keep their room. */}
          <span className="block text-sm break-all text-ink-muted md:hidden">{p.email}</span>
          <span className="block text-sm text-ink-muted md:hidden">Joined {formatDate(p.joinedAt)}</span>
        </>
      );
    },
  }),
  col.accessor("email", { header: "E-mail", meta: { head: ON_WIDE_SCREENS, cell: `${ON_WIDE_SCREENS} text-sm break-all` }, cell: ({ row }) => row.original.email }),
  col.accessor("joinedAt", { header: "Joined", meta: { head: ON_WIDE_SCREENS, cell: `${ON_WIDE_SCREENS} text-sm whitespace-nowrap` }, cell: ({ row }) => formatDate(row.original.joinedAt) }),
  col.display({
    id: "roles",
    header: "Roles (press to grant or revoke)",
    cell: ({ row, table }) => {
      const p = row.original;
      const { selfId, changeRole } = table.options.meta!;
      return (
        <div className="flex flex-wrap gap-2" role="group" aria-label={`Roles of ${p.name}`}>
          {ROLES.map((role) => (
            <RoleSwitch
              key={role}
              action={changeRole}
              userId={p.id}
              role={role}
              label={ROLE_LABELS[role]}
              held={p.roles.includes(role)}
              personName={p.name}
              lockedReason={role === "admin" && p.id === selfId && p.roles.includes("admin") ? "You cannot revoke your own administrator role; another administrator can." : undefined}
            />
          ))}
        </div>
      );
    },
  }),
  col.display({
    id: "sign-in",
    header: "Sign-in",
    cell: ({ row, table }) => {
      const p = row.original;
      const { selfId, setDisabled } = table.options.meta!;
      return <DisablePerson action={setDisabled} userId={p.id} personName={p.name} disabled={p.disabledAt !== null} isSelf={p.id === selfId} />;
    },
  }),
]);

export function PeopleTable({ people, caption, emptyText, ...meta }: { people: PersonDto[]; caption: string; emptyText: string } & PeopleTableMeta) {
  const table = useTable({ features, columns: COLUMNS, data: people, getRowId: (p) => p.id, meta });
  return (
    <Table caption={caption}>
      <TableHead>
        {table.getHeaderGroups().map((group) => (
          <TableRow key={group.id}>
            {group.headers.map((header) => (
              <TableHeader key={header.id} className={header.column.columnDef.meta?.head}>
                <table.FlexRender header={header} />
              </TableHeader>
            ))}
          </TableRow>
        ))}
      </TableHead>
      <TableBody>
        {people.length === 0 ? (
          <TableEmptyRow colSpan={COLUMNS.length}>{emptyText}</TableEmptyRow>
        ) : (
          table.getRowModel().rows.map((row) => (
            <TableRow key={row.id}>
              {row.getAllCells().map((cell) => (
                <TableCell key={cell.id} className={cell.column.columnDef.meta?.cell}>
                  <table.FlexRender cell={cell} />
                </TableCell>
              ))}
            </TableRow>
          ))
        )}
      </TableBody>
    </Table>
  );
}
