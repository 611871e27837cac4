import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/actor";
import { PageTitle } from "@/components/page-title";
import { SettingsForm } from "@/components/society/settings-form";
import { getDb } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { LICENCES } from "@/lib/society/settings";
import { saveSettingsAction } from "./actions";

export const metadata: Metadata = { title: "Society settings" };

export default async function SettingsPage() {
  await requirePagePermission("settings:edit", "/admin/settings");
  const s = await findSocietySettings(getDb());
  return (
    <>
      <PageTitle title="Society settings" lead="The name shown on every page, and the defaults curators start from." />
      <SettingsForm
        action={saveSettingsAction}
        initial={{
          name: s.name,
          shortName: s.shortName,
          defaultLicence: s.defaultLicence,
          defaultCreditLine: s.defaultCreditLine,
          creditLineTemplate: s.creditLineTemplate,
          changeReasons: s.changeReasons.map((r) => r.label).join("\n"),
          rejectionReasons: s.rejectionReasons.map((r) => r.label).join("\n"),
        }}
        licences={Object.entries(LICENCES).map(([value, label]) => ({ value, label }))}
      />
    </>
  );
}
