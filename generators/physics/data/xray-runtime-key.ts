/** Global slot the site's response worker fills with the model document's element table (see xray-elements-runtime.ts). */
export const RUNTIME_TABLE_KEY = '__kilnXrayTable';
