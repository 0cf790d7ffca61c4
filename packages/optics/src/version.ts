/** Version of the thin-film engine; stored with every yield result so a re-run can be matched to it. */
export const ENGINE_VERSION = "0.2.0";
