// The numeric core's version, written into every master's provenance.
export const PIPELINE_VERSION = "crownlight-imaging 0.2.0";
