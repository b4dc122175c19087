/**
 * The API's URL space: where the source path starts in each resource's URL. The routes, the
 * URLs an ingest manifest lists and the command line all read them here,
 * so domain code that writes a URL never imports an HTTP route.
 */
export const renditionsPrefix = '/v1/renditions/';
export const aliasRiskPrefix = '/v1/alias-risk/';
