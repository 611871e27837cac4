// Mail texts in the society's voice. Plain text first; the HTML is the same
// words with a link.
import type { MailDraft } from "./outbox";

const esc = (s: string) => s.replace(/[&<>"]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;" })[c] ?? c);

function wrap(society: string, paragraphs: string[], link: { href: string; label: string }): string {
  return `<div style="font-family:system-ui,sans-serif;line-height:1.5">${paragraphs
    .map((p) => `<p>${esc(p)}</p>`)
    .join("")}<p><a href="${esc(link.href)}">${esc(link.label)}</a></p><p style="color:#666">${esc(society)}</p></div>`;
}

/**
 * Sent to whatever address was typed at sign-up, before anyone knows who typed
 * it: so it carries no text of theirs (not even the name), only the society's.
 */
export function verificationMail(society: string, to: string, url: string): MailDraft {
  const lines = [`Someone signed up for the ${society} eclipse workspace with this address.`, `Please confirm that ${to} is your address.`];
  return {
    to,
    subject: `Confirm your address for ${society}`,
    text: `${lines.join("\n\n")}\n\nConfirm: ${url}\n\nIf you did not sign up, you can ignore this message.\n\n${society}`,
    html: wrap(society, [...lines, "If you did not sign up, you can ignore this message."], { href: url, label: "Confirm my address" }),
  };
}

/** Also asked for by anyone who types the address: no text of the account's own comes first. */
export function passwordResetMail(society: string, to: string, url: string): MailDraft {
  const lines = [`Someone asked to set a new password for the ${society} account of ${to}.`, "The link works for one hour."];
  return {
    to,
    subject: `Set a new password for ${society}`,
    text: `${lines.join("\n\n")}\n\nNew password: ${url}\n\nIf it was not you, ignore this message; your password stays as it is.\n\n${society}`,
    html: wrap(society, [...lines, "If it was not you, ignore this message; your password stays as it is."], {
      href: url,
      label: "Choose a new password",
    }),
  };
}

function draft(society: string, to: string, subject: string, lines: string[], link: { href: string; label: string }): MailDraft {
  return {
    to,
    subject,
    text: `${lines.join("\n\n")}\n\n${link.label}: ${link.href}\n\n${society}`,
    html: wrap(society, lines, link),
  };
}

/** To a curator: a photographer has sent a bracket set to the review desk. */
export function reviewRequestedMail(
  society: string,
  to: string,
  curatorName: string,
  set: { name: string; photographerName: string; url: string; isResubmission?: boolean },
): MailDraft {
  return draft(
    society,
    to,
    `Bracket set ${set.isResubmission ? "sent again" : "awaiting review"}: ${set.name}`,
    [
      `Hello ${curatorName},`,
      set.isResubmission
        ? `${set.photographerName} has made the changes asked for and sent the bracket set "${set.name}" for review again. It is waiting on the review desk.`
        : `${set.photographerName} has sent the bracket set "${set.name}" for review. It is waiting on the review desk.`,
    ],
    { href: set.url, label: "Open the bracket set" },
  );
}

/** To whoever started it: a reduction has finished (a curator's re-reduction says so and links to the review desk). */
export function reductionFinishedMail(society: string, to: string, name: string, reduction: { setName: string; url: string; isReReduction?: boolean }): MailDraft {
  return draft(
    society,
    to,
    `${reduction.isReReduction ? "Re-reduction" : "Reduction"} finished: ${reduction.setName}`,
    [
      `Hello ${name},`,
      reduction.isReReduction
        ? `The re-reduction you started of the bracket set "${reduction.setName}" has finished. Its renditions can be compared with the others on the review desk.`
        : `The reduction of your bracket set "${reduction.setName}" has finished. Both renditions, the master FITS file and the report are ready.`,
    ],
    { href: reduction.url, label: reduction.isReReduction ? "Open the set on the review desk" : "See the reduction" },
  );
}

/** To whoever started it: a reduction has failed and will not be tried again. */
export function reductionFailedMail(society: string, to: string, name: string, reduction: { setName: string; reason: string; url: string; isReReduction?: boolean }): MailDraft {
  return draft(
    society,
    to,
    `${reduction.isReReduction ? "Re-reduction" : "Reduction"} failed: ${reduction.setName}`,
    [
      `Hello ${name},`,
      reduction.isReReduction
        ? `The re-reduction you started of the bracket set "${reduction.setName}" failed and will not be tried again.`
        : `The reduction of your bracket set "${reduction.setName}" failed and will not be tried again.`,
      `Reason: ${reduction.reason}`,
      reduction.isReReduction
        ? "The photographer's originals are untouched. Correct what the reason names, then start another re-reduction."
        : "Your originals are untouched. Correct what the reason names, then start a new reduction.",
    ],
    { href: reduction.url, label: reduction.isReReduction ? "Open the set on the review desk" : "See the reduction" },
  );
}

/** To the photographer: what a curator decided about their set. Never carries a curator's private note. */
export function reviewDecisionMail(
  society: string,
  to: string,
  name: string,
  decision: { action: "request-changes" | "approve" | "reject" | "reopen"; setName: string; reason: string | null; message: string | null; url: string },
): MailDraft {
  const set = `"${decision.setName}"`;
  const reason = decision.reason ? [`Reason: ${decision.reason}`] : [];
  const message = decision.message ? [`Message from the curators:\n${decision.message}`] : [];
  const texts = {
    "request-changes": {
      subject: `Changes asked for: ${decision.setName}`,
      lines: [`The curators have looked at your bracket set ${set} and ask for changes before it can go further.`, ...reason, ...message, "Make the changes on the set's page, then submit it for review again."],
      label: "Open the bracket set",
    },
    approve: {
      subject: `Approved: ${decision.setName}`,
      lines: [`The curators have approved your bracket set ${set}. They will now prepare a plate from it for the gallery.`, ...message],
      label: "Open the bracket set",
    },
    reject: {
      subject: `Not accepted: ${decision.setName}`,
      lines: [`The curators have decided not to accept your bracket set ${set}.`, ...reason, ...message, "Your frames and reductions stay in your studio."],
      label: "Open the bracket set",
    },
    reopen: {
      subject: `Back on the review desk: ${decision.setName}`,
      lines: [`The curators have taken back their earlier decision on your bracket set ${set}; it is awaiting review again.`],
      label: "Open the bracket set",
    },
  }[decision.action];
  return draft(society, to, texts.subject, [`Hello ${name},`, ...texts.lines], { href: decision.url, label: texts.label });
}

/** To a curator: a visitor reported a plate from its public page. */
export function plateReportedMail(society: string, to: string, curatorName: string, report: { plateTitle: string; kind: string; message: string; url: string; quietMinutes: number }): MailDraft {
  return draft(
    society,
    to,
    `Plate reported (${report.kind}): ${report.plateTitle}`,
    [
      `Hello ${curatorName},`,
      `A visitor reported the plate "${report.plateTitle}" as a question of ${report.kind}. They wrote:`,
      report.message,
      "The report waits in the plate editor, where you can withdraw the plate for the time being and answer the visitor.",
      `Further reports on this plate in the next ${report.quietMinutes} minutes are not mailed one by one: the plate editor lists every open report.`,
    ],
    { href: report.url, label: "Open the plate editor" },
  );
}

/** To a visitor who reported a plate: the curator's answer. */
export function plateReportAnswerMail(society: string, to: string, report: { plateTitle: string; answer: string; url: string }): MailDraft {
  return draft(
    society,
    to,
    `About your report on "${report.plateTitle}"`,
    ["Hello,", `Thank you for your report on the plate "${report.plateTitle}". A curator of ${society} answers:`, report.answer],
    { href: report.url, label: "See the plate" },
  );
}

/** To the editor who asked: the print bundle of an edition is ready to download. */
export function editionExportReadyMail(society: string, to: string, name: string, edition: { title: string; plates: number; size: string; url: string }): MailDraft {
  return draft(
    society,
    to,
    `Print bundle ready: ${edition.title}`,
    [
      `Hello ${name},`,
      `The print bundle of "${edition.title}" is ready: ${edition.plates} plate${edition.plates === 1 ? "" : "s"}, ${edition.size}, with TIFF and JPEG files, captions, credits, metadata and a PDF proof.`,
      "Check the proof before sending the files to the printer.",
    ],
    { href: edition.url, label: "Download it from the edition" },
  );
}

/** To the editor who asked: the print bundle could not be made. */
export function editionExportFailedMail(society: string, to: string, name: string, edition: { title: string; reason: string; url: string }): MailDraft {
  return draft(
    society,
    to,
    `Print bundle failed: ${edition.title}`,
    [`Hello ${name},`, `The print bundle of "${edition.title}" could not be made.`, `Reason: ${edition.reason}`, "The edition is unchanged; correct what the reason names and export again."],
    { href: edition.url, label: "Open the edition" },
  );
}

/** To the photographer: a curator published, withdrew or restored the plate made from their set. */
export function plateStateMail(
  society: string,
  to: string,
  name: string,
  plate: { change: "published" | "withdrawn-temporary" | "withdrawn-permanent" | "restored"; title: string; setName: string; reason: string | null; url: string },
): MailDraft {
  const title = `"${plate.title}"`;
  const reason = plate.reason ? [`Reason: ${plate.reason}`] : [];
  const texts = {
    published: {
      subject: `Published: ${plate.title}`,
      lines: [`Your bracket set "${plate.setName}" is now in the public gallery as the plate ${title}, with your credit.`],
      label: "See the plate",
    },
    "withdrawn-temporary": {
      subject: `Withdrawn for the time being: ${plate.title}`,
      lines: [`The curators have taken the plate ${title} out of the gallery for the time being while it is looked at. Its page keeps the record and shows the reason.`, ...reason, "You will hear from us when it is restored."],
      label: "See the plate's page",
    },
    "withdrawn-permanent": {
      subject: `Withdrawn: ${plate.title}`,
      lines: [`The curators have withdrawn the plate ${title} for good. Its page keeps the record and shows the reason; your frames and reductions stay in your studio.`, ...reason],
      label: "See the plate's page",
    },
    restored: {
      subject: `Back in the gallery: ${plate.title}`,
      lines: [`The plate ${title} is back in the public gallery.`],
      label: "See the plate",
    },
  }[plate.change];
  return draft(society, to, texts.subject, [`Hello ${name},`, ...texts.lines], { href: plate.url, label: texts.label });
}

/** To a person an admin invited: a link to choose their password, which also signs them up. */
export function invitationMail(society: string, to: string, name: string, invite: { invitedBy: string; roles: string[]; url: string; validDays: number }): MailDraft {
  const lines = [
    `Hello ${name},`,
    `${invite.invitedBy} has invited you to the ${society} eclipse workspace${invite.roles.length ? ` as ${invite.roles.join(", ")}` : ""}.`,
    `Choose a password to start. The link works for ${invite.validDays} days; after that, ask for a new one with "Forgot your password?" on the sign-in page.`,
  ];
  return draft(society, to, `You are invited to ${society}`, lines, { href: invite.url, label: "Choose your password" });
}
