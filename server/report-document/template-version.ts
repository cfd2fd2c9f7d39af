/**
 * The version of the report's wording: the templates in `templates/report/<version>/` and the
 * sentences built in `view-model.ts`. Each signed report version records it beside its stored
 * narrative. Any change of wording gets a new version string, so two reports drafted with different
 * words never carry the same version.
 */
export const REPORT_TEMPLATE_VERSION = 'v1';
