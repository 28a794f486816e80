/**
 * The JSON Schema of `sidcarve diff --format json` (`sidcarve/diff/v1`); schemas/diff.schema.json
 * is written from it by `npm run schemas`, and test/diff keeps the two equal.
 */
const side = {
  type: "object",
  required: ["file", "kind", "plan", "nodes", "sids"],
  additionalProperties: false,
  properties: {
    file: { type: "string" },
    kind: { enum: ["plan", "csv", "json-table"], description: "a plan read with its lock, or a SID table file" },
    plan: { type: "string", description: "plan name; empty when a table does not name one" },
    nodes: { type: "integer", minimum: 0 },
    sids: { type: "integer", minimum: 0 },
  },
} as const;

const touch = {
  type: "object",
  required: ["kind", "name"],
  additionalProperties: false,
  properties: {
    kind: { enum: ["node", "vrf", "adjacency", "service", "policy", "table"] },
    name: { type: "string", description: "the VRF, service, policy or table name; for an adjacency `node -> neighbor (interface)`" },
  },
} as const;

const count = { type: "integer", minimum: 0 } as const;

export const DIFF_SCHEMA = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://sidcarve.invalid/schemas/diff.schema.json",
  title: "sidcarve diff",
  description: "What moves between two SID tables (each from a plan and its lock, or from a table file), as written by `sidcarve diff --format json`.",
  type: "object",
  required: ["schema", "old", "new", "disruptive", "accepted", "counts", "nodes"],
  additionalProperties: false,
  $defs: {
    side,
    touch,
    locator: {
      type: ["object", "null"],
      required: ["prefix", "algorithm", "anycast"],
      additionalProperties: false,
      properties: {
        prefix: { type: "string", description: "RFC 5952 prefix" },
        algorithm: { type: "integer", minimum: 0, maximum: 255 },
        anycast: { type: ["string", "null"] },
      },
    },
    sid: {
      type: ["object", "null"],
      required: ["sid", "behavior", "flavors", "codepoint", "algorithm", "locator", "structure", "context"],
      additionalProperties: false,
      properties: {
        sid: { type: "string", description: "RFC 5952 address" },
        behavior: { type: "string" },
        flavors: { type: "array", items: { type: "string" } },
        codepoint: { type: ["integer", "null"] },
        algorithm: { type: "integer" },
        locator: { type: ["string", "null"] },
        structure: {
          type: ["object", "null"],
          required: ["block", "node", "function", "argument"],
          additionalProperties: false,
          properties: { block: count, node: count, function: count, argument: count },
        },
        context: { type: "object", additionalProperties: { type: "string" } },
      },
    },
  },
  properties: {
    schema: { const: "sidcarve/diff/v1" },
    old: { $ref: "#/$defs/side" },
    new: { $ref: "#/$defs/side" },
    disruptive: { type: "boolean", description: "something was removed, renumbered or changed" },
    accepted: { type: "boolean", description: "disruptive and accepted with --accept-disruption (the exit code is then 0)" },
    counts: {
      type: "object",
      required: ["locatorsAdded", "locatorsRemoved", "locatorsRenumbered", "sidsAdded", "sidsRemoved", "sidsRenumbered", "sidsChanged", "sidsUnchanged"],
      additionalProperties: false,
      properties: {
        locatorsAdded: count,
        locatorsRemoved: count,
        locatorsRenumbered: count,
        sidsAdded: count,
        sidsRemoved: count,
        sidsRenumbered: count,
        sidsChanged: count,
        sidsUnchanged: count,
      },
    },
    nodes: {
      type: "array",
      description: "nodes with at least one change, sorted by name",
      items: {
        type: "object",
        required: ["node", "status", "touches", "locators", "sids"],
        additionalProperties: false,
        properties: {
          node: { type: "string" },
          status: { enum: ["added", "removed", "changed"], description: "added/removed: the node is only in the new/old table" },
          touches: { type: "array", items: { $ref: "#/$defs/touch" } },
          locators: {
            type: "array",
            items: {
              type: "object",
              required: ["change", "old", "new"],
              additionalProperties: false,
              properties: {
                change: { enum: ["added", "removed", "renumbered"] },
                old: { $ref: "#/$defs/locator" },
                new: { $ref: "#/$defs/locator" },
              },
            },
          },
          sids: {
            type: "array",
            items: {
              type: "object",
              required: ["change", "binding", "fields", "touches", "old", "new"],
              additionalProperties: false,
              properties: {
                change: { enum: ["added", "removed", "renumbered", "changed"] },
                binding: { type: "string", description: "binding identity: algorithm|behavior|End flavours|context" },
                fields: {
                  type: "array",
                  description: "what differs besides the address",
                  items: { enum: ["behavior", "flavors", "codepoint", "structure", "context", "locator"] },
                },
                touches: { type: "array", items: { $ref: "#/$defs/touch" } },
                old: { $ref: "#/$defs/sid" },
                new: { $ref: "#/$defs/sid" },
              },
            },
          },
        },
      },
    },
  },
} as const;
