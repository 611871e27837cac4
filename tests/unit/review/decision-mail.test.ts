import { describe, expect, it } from "vitest";
import { reviewDecisionMail, reviewRequestedMail } from "@/lib/email/templates";

const base = { setName: "Luxor <totality>", url: "https://crownlight.example/studio/sets/1" };

describe("review mails", () => {
  it("carry the reason and the message when changes are asked for, escaped in HTML", () => {
    const m = reviewDecisionMail("Kestrel Ridge Astronomical Society", "o@example.org", "Oskar", {
      ...base,
      action: "request-changes",
      reason: "Exposure times missing or wrong",
      message: "Frame 3 & 4: check the camera's record.",
    });
    expect(m.subject).toBe("Changes asked for: Luxor <totality>");
    expect(m.text).toContain("Reason: Exposure times missing or wrong");
    expect(m.text).toContain("Frame 3 & 4");
    expect(m.text).toContain(base.url);
    expect(m.html).toContain("Luxor &lt;totality&gt;");
    expect(m.html).not.toContain("<totality>");
  });

  it("say approved, not accepted with the reason, and back on the desk", () => {
    const approve = reviewDecisionMail("KRAS", "o@example.org", "Oskar", { ...base, action: "approve", reason: null, message: null });
    expect(approve.subject).toBe("Approved: Luxor <totality>");
    expect(approve.text).not.toContain("Reason:");
    const reject = reviewDecisionMail("KRAS", "o@example.org", "Oskar", { ...base, action: "reject", reason: "Not the Sun", message: null });
    expect(reject.text).toContain("Reason: Not the Sun");
    expect(reviewDecisionMail("KRAS", "o@example.org", "Oskar", { ...base, action: "reopen", reason: null, message: null }).subject).toBe("Back on the review desk: Luxor <totality>");
  });

  it("tell curators when a set comes back after changes", () => {
    const m = reviewRequestedMail("KRAS", "c@example.org", "Tomasz", { name: "Cadiz", photographerName: "Nadia Fairweather", url: base.url, isResubmission: true });
    expect(m.subject).toBe("Bracket set sent again: Cadiz");
    expect(m.text).toContain("has made the changes asked for");
    expect(reviewRequestedMail("KRAS", "c@example.org", "Tomasz", { name: "Cadiz", photographerName: "Nadia", url: base.url }).subject).toBe("Bracket set awaiting review: Cadiz");
  });
});
