// The licences a plate may carry, with the links that explain them and the URI
// that IIIF manifests put in "rights" (a Creative Commons or RightsStatements.org
// URI, as the Presentation API 3.0 asks). Client-safe.
import type { PlateLicence } from "@/db/schema/plates";

export interface LicenceInfo {
  id: PlateLicence;
  name: string;
  shortName: string;
  /** Human-readable deed; for all rights reserved, the statement's page. */
  deedUrl: string;
  /** The URI for IIIF "rights" and for XMP web statements. */
  rightsUri: string;
  /** Whether full-resolution files may be offered for download. */
  allowsDownload: boolean;
}

export const LICENCE_INFO: Record<PlateLicence, LicenceInfo> = {
  "CC-BY-4.0": { id: "CC-BY-4.0", name: "Creative Commons Attribution 4.0 International", shortName: "CC BY 4.0", deedUrl: "https://creativecommons.org/licenses/by/4.0/", rightsUri: "http://creativecommons.org/licenses/by/4.0/", allowsDownload: true },
  "CC-BY-SA-4.0": { id: "CC-BY-SA-4.0", name: "Creative Commons Attribution-ShareAlike 4.0 International", shortName: "CC BY-SA 4.0", deedUrl: "https://creativecommons.org/licenses/by-sa/4.0/", rightsUri: "http://creativecommons.org/licenses/by-sa/4.0/", allowsDownload: true },
  "CC-BY-NC-4.0": { id: "CC-BY-NC-4.0", name: "Creative Commons Attribution-NonCommercial 4.0 International", shortName: "CC BY-NC 4.0", deedUrl: "https://creativecommons.org/licenses/by-nc/4.0/", rightsUri: "http://creativecommons.org/licenses/by-nc/4.0/", allowsDownload: true },
  "CC-BY-NC-SA-4.0": { id: "CC-BY-NC-SA-4.0", name: "Creative Commons Attribution-NonCommercial-ShareAlike 4.0 International", shortName: "CC BY-NC-SA 4.0", deedUrl: "https://creativecommons.org/licenses/by-nc-sa/4.0/", rightsUri: "http://creativecommons.org/licenses/by-nc-sa/4.0/", allowsDownload: true },
  "CC0-1.0": { id: "CC0-1.0", name: "Creative Commons Zero 1.0 Universal (public domain dedication)", shortName: "CC0 1.0", deedUrl: "https://creativecommons.org/publicdomain/zero/1.0/", rightsUri: "http://creativecommons.org/publicdomain/zero/1.0/", allowsDownload: true },
  "all-rights-reserved": { id: "all-rights-reserved", name: "All rights reserved", shortName: "All rights reserved", deedUrl: "http://rightsstatements.org/vocab/InC/1.0/", rightsUri: "http://rightsstatements.org/vocab/InC/1.0/", allowsDownload: false },
};

/**
 * What a curator must know before a plate under this licence is made public
 * (or taken out of view): Creative Commons grants cannot be called back.
 * Null for all rights reserved.
 */
export function licenceWarning(licence: PlateLicence): string | null {
  if (licence === "all-rights-reserved") return null;
  return `Creative Commons licences cannot be revoked: once published under ${LICENCE_INFO[licence].shortName}, copies already taken keep that licence even if the plate is withdrawn or relicensed.`;
}
