/**
 * The JSON Schema of emitted SID tables (`sidcarve/sid-table/v1`); `schemas/sid-table.schema.json`
 * is written from it by `npm run schemas`, and a test keeps the two equal.
 */
export const SID_TABLE_SCHEMA = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://sidcarve.invalid/schemas/sid-table.schema.json",
  title: "sidcarve SID table",
  description: "Every node's locators and SIDs, as emitted by `sidcarve emit --format json`, and as accepted by `sidcarve lint`.",
  type: "object",
  required: ["schema", "nodes"],
  additionalProperties: false,
  properties: {
    schema: { const: "sidcarve/sid-table/v1" },
    plan: { type: "string" },
    caution: { type: "string" },
    nodes: {
      type: "array",
      items: {
        type: "object",
        required: ["node", "sids"],
        additionalProperties: false,
        properties: {
          node: { type: "string", minLength: 1 },
          locators: {
            type: "array",
            items: {
              type: "object",
              required: ["prefix"],
              additionalProperties: false,
              properties: {
                prefix: { type: "string", description: "RFC 5952 prefix, e.g. 5f00:0:4800:8001::/64" },
                algorithm: { type: "integer", minimum: 0, maximum: 255 },
                block: { type: ["string", "null"] },
                anycast: { type: ["string", "null"] },
              },
            },
          },
          sids: {
            type: "array",
            items: {
              type: "object",
              required: ["sid", "behavior"],
              additionalProperties: false,
              properties: {
                sid: { type: "string", description: "RFC 5952 address" },
                behavior: { type: "string", description: "IANA behaviour name, e.g. End.DT4" },
                flavors: { type: "array", items: { type: "string" } },
                codepoint: { type: ["integer", "null"], minimum: 0, maximum: 65535 },
                algorithm: { type: "integer", minimum: 0, maximum: 255 },
                locator: { type: ["string", "null"] },
                function: { type: ["string", "null"], description: "hex, e.g. 0x100" },
                structure: {
                  type: ["object", "null"],
                  required: ["block", "node", "function", "argument"],
                  additionalProperties: false,
                  properties: {
                    block: { type: "integer", minimum: 0, maximum: 128 },
                    node: { type: "integer", minimum: 0, maximum: 128 },
                    function: { type: "integer", minimum: 0, maximum: 128 },
                    argument: { type: "integer", minimum: 0, maximum: 128 },
                  },
                },
                context: { type: "object", additionalProperties: { type: "string" } },
              },
            },
          },
        },
      },
    },
  },
} as const;
