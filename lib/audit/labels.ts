// What each audit entry means, in words. The action codes (plate.published)
// stay in the log for queries; pages show these phrases instead.
const PHRASES: Record<string, string> = {
  "plate.created": "draft made",
  "plate.edited": "texts edited",
  "plate.published": "published",
  "plate.withdrawn": "withdrawn",
  "plate.restored": "restored to the gallery",
  "plate.version-added": "new version added",
  "plate.reported": "reported by a visitor",
  "plate.report-answered": "report answered",
  "review.submit": "sent for review",
  "review.resubmit": "sent for review again",
  "review.request-changes": "changes asked for",
  "review.approve": "approved",
  "review.reject": "rejected",
  "review.reopen": "reopened",
  "review.assign": "taken in hand",
  "review.unassign": "let go",
  "review.note": "private note added",
  "edition.created": "edition started",
  "edition.renamed": "edition renamed",
  "edition.deleted": "edition deleted",
  "edition.embargo-set": "embargo set",
  "edition.plate-added": "plate added to an edition",
  "edition.plate-removed": "plate taken out of an edition",
  "edition.plate-laid-out": "plate laid out",
  "edition.plate-version-changed": "plate's version changed in an edition",
  "edition.export-started": "print bundle started",
  "edition.exported": "print bundle made",
  "edition.reopened": "edition reopened",
  "eclipse.edited": "eclipse names edited",
  "settings.changed": "society settings changed",
  "role.granted": "role granted",
  "role.revoked": "role revoked",
  "person.invited": "invited",
  "person.disabled": "disabled",
  "person.enabled": "enabled again",
};

/** "plate.published" -> "published"; an action we have no phrase for reads as words, never as a code. */
export function describeAudit(action: string): string {
  return PHRASES[action] ?? action.replace(/^[a-z]+\./, "").replace(/[-_.]/g, " ");
}
