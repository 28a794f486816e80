/**
 * The JSON Schema of a sidcarve plan (draft 2020-12 subset that ajv checks). This object is the
 * source of truth; `schemas/plan.schema.json` is written from it by `npm run schemas` and a test
 * keeps the two equal.
 */

const name = { type: "string", minLength: 1, maxLength: 128, pattern: "^[^\\u0000-\\u001f\\u007f]+$" } as const;
/** A whole number written as a YAML/JSON integer or as a "0x..." hex string. */
const value = {
  oneOf: [
    { type: "integer", minimum: 0 },
    { type: "string", pattern: "^(0[xX][0-9a-fA-F]{1,32}|[0-9]{1,39})$" },
  ],
} as const;
/** One value or an inclusive range "first-last", e.g. "0x0100-0x01ff". */
const range = {
  oneOf: [
    { type: "integer", minimum: 0 },
    { type: "string", pattern: "^\\s*(0[xX][0-9a-fA-F]{1,32}|[0-9]{1,39})(\\s*-\\s*(0[xX][0-9a-fA-F]{1,32}|[0-9]{1,39}))?\\s*$" },
  ],
} as const;
const ranges = { type: "array", items: range, maxItems: 4096 } as const;
const bits = { type: "integer", minimum: 0, maximum: 128 } as const;
const algorithm = { type: "integer", minimum: 0, maximum: 255 } as const;
const flavorList = {
  type: "array",
  items: { type: "string", enum: ["PSP", "USP", "USD", "psp", "usp", "usd"] },
  uniqueItems: true,
  maxItems: 3,
} as const;
const nameList = { type: "array", items: name, uniqueItems: true, maxItems: 100000 } as const;
const prefixText = { type: "string", minLength: 2, maxLength: 64 } as const;

const linkEnd = {
  oneOf: [
    name,
    {
      type: "object",
      additionalProperties: false,
      required: ["node"],
      properties: { node: name, interface: name, function: value, "protected-function": value },
    },
  ],
} as const;

const group: Record<string, unknown> = {
  type: "object",
  additionalProperties: false,
  properties: {
    value,
    summary: prefixText,
    description: { type: "string", maxLength: 1000 },
    groups: { type: "object", maxProperties: 100000, additionalProperties: { $ref: "#/$defs/group" } },
  },
};

export const PLAN_SCHEMA = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://sidcarve.invalid/schemas/plan.schema.json",
  title: "sidcarve plan",
  description: "An SRv6 SID address plan: blocks, node hierarchy, nodes, links and services.",
  type: "object",
  additionalProperties: false,
  required: ["sidcarve", "plan", "blocks", "levels", "nodes"],
  $defs: { group },
  properties: {
    sidcarve: { const: 1, description: "Plan format version." },
    plan: name,
    operator: { type: "string", maxLength: 200 },
    description: { type: "string", maxLength: 4000 },
    algorithms: {
      type: "array",
      maxItems: 130,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["id"],
        properties: { id: algorithm, name },
      },
    },
    levels: {
      type: "array",
      minItems: 1,
      maxItems: 16,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name", "bits"],
        properties: {
          name,
          bits: { type: "integer", minimum: 1, maximum: 64 },
          order: { type: "string", enum: ["sequential", "leftmost", "centremost", "centermost", "rightmost"] },
          reserved: ranges,
        },
      },
    },
    blocks: {
      type: "array",
      minItems: 1,
      maxItems: 256,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name", "prefix"],
        properties: {
          name,
          prefix: prefixText,
          algorithms: { type: "array", items: algorithm, minItems: 1, uniqueItems: true, maxItems: 130 },
          "algorithm-bits": { type: "integer", minimum: 0, maximum: 8 },
          groups: nameList,
          structure: {
            type: "object",
            additionalProperties: false,
            required: ["node", "function"],
            properties: { block: bits, node: bits, function: bits, argument: bits },
          },
          compression: {
            type: "object",
            additionalProperties: false,
            required: ["flavor", "csid-bits", "global-pool"],
            properties: {
              flavor: { type: "string", enum: ["next-csid", "replace-csid", "NEXT-CSID", "REPLACE-CSID", "NEXT-C-SID", "REPLACE-C-SID"] },
              "csid-bits": { type: "integer", minimum: 1, maximum: 128 },
              "node-bits": bits,
              "global-pool": ranges,
              "local-pool": ranges,
              argument: bits,
            },
          },
        },
      },
    },
    groups: { type: "object", maxProperties: 100000, additionalProperties: { $ref: "#/$defs/group" } },
    "end-sids": {
      description: "End SIDs each node gets per algorithm: one entry per SID, listing its flavours.",
      type: "array",
      minItems: 1,
      maxItems: 8,
      items: { type: "object", additionalProperties: false, properties: { flavors: flavorList } },
    },
    "adjacency-flavors": flavorList,
    "function-pools": {
      type: "object",
      additionalProperties: false,
      properties: { end: ranges, adjacency: ranges, service: ranges, l2: ranges, binding: ranges, table: ranges },
    },
    "reserved-functions": ranges,
    nodes: {
      type: "array",
      maxItems: 200000,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name"],
        properties: {
          name,
          place: name,
          role: { type: "string", enum: ["p", "pe", "border", "rr", "other"] },
          value,
          algorithms: { type: "array", items: algorithm, uniqueItems: true, maxItems: 130 },
          anycast: nameList,
          msd: {
            type: "object",
            additionalProperties: false,
            properties: {
              "max-sl": { type: "integer", minimum: 0, maximum: 255 },
              "max-end-pop": { type: "integer", minimum: 0, maximum: 255 },
              "max-h-encaps": { type: "integer", minimum: 0, maximum: 255 },
              "max-end-d": { type: "integer", minimum: 0, maximum: 255 },
            },
          },
        },
      },
    },
    anycast: {
      type: "array",
      maxItems: 10000,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name"],
        properties: { name, place: name, value, algorithms: { type: "array", items: algorithm, uniqueItems: true } },
      },
    },
    links: {
      type: "array",
      maxItems: 1000000,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["ends"],
        properties: {
          name,
          ends: { type: "array", minItems: 2, maxItems: 2, items: linkEnd },
          protection: { type: "string", enum: ["unprotected", "protected", "both"] },
          algorithms: { type: "array", items: algorithm, uniqueItems: true },
        },
      },
    },
    vrfs: {
      type: "array",
      maxItems: 100000,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name", "pes"],
        properties: {
          name,
          table: { type: "integer", minimum: 0, maximum: 4294967295 },
          families: { type: "array", items: { type: "string", enum: ["ipv4", "ipv6"] }, minItems: 1, uniqueItems: true },
          mode: { type: "string", enum: ["combined", "split"], description: "combined: one End.DT46; split: End.DT4 and End.DT6" },
          algorithm,
          pes: nameList,
          ces: {
            type: "array",
            maxItems: 100000,
            items: {
              type: "object",
              additionalProperties: false,
              required: ["name", "pe", "family"],
              properties: { name, pe: name, family: { type: "string", enum: ["ipv4", "ipv6"] }, interface: name },
            },
          },
        },
      },
    },
    "l2-services": {
      type: "array",
      maxItems: 100000,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name", "kind"],
        properties: {
          name,
          kind: { type: "string", enum: ["wire", "vlan-wire", "bridge"], description: "wire: End.DX2; vlan-wire: End.DX2V; bridge: End.DT2U + End.DT2M" },
          algorithm,
          attachments: {
            type: "array",
            maxItems: 1000,
            items: {
              type: "object",
              additionalProperties: false,
              required: ["node"],
              properties: { node: name, interface: name, vlan: { type: "integer", minimum: 0, maximum: 4095 } },
            },
          },
          nodes: nameList,
        },
      },
    },
    policies: {
      type: "array",
      maxItems: 100000,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name", "node"],
        properties: {
          name,
          node: name,
          behavior: { type: "string", enum: ["End.B6.Encaps", "End.B6.Encaps.Red", "End.BM"] },
          algorithm,
          endpoint: name,
          color: { type: "integer", minimum: 0, maximum: 4294967295 },
        },
      },
    },
    tables: {
      type: "array",
      maxItems: 10000,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name", "nodes"],
        properties: { name, table: { type: "integer", minimum: 0, maximum: 4294967295 }, nodes: nameList, flavors: flavorList },
      },
    },
    infrastructure: {
      type: "array",
      maxItems: 100000,
      items: {
        type: "object",
        additionalProperties: false,
        required: ["name", "prefix"],
        properties: { name, prefix: prefixText, kind: { type: "string", enum: ["loopback", "link", "customer", "management", "other"] } },
      },
    },
    lint: {
      type: "object",
      additionalProperties: false,
      properties: {
        severity: {
          type: "object",
          additionalProperties: { type: "string", enum: ["off", "info", "warning", "error"] },
        },
        "capacity-threshold": { type: "number", exclusiveMinimum: 0, maximum: 1 },
        production: { type: "boolean" },
        waivers: {
          type: "array",
          maxItems: 10000,
          items: {
            type: "object",
            additionalProperties: false,
            required: ["rule", "objects", "reason", "expires"],
            properties: {
              rule: name,
              objects: { type: "array", items: name, minItems: 1 },
              reason: { type: "string", minLength: 3, maxLength: 1000 },
              expires: { type: "string", pattern: "^\\d{4}-\\d{2}-\\d{2}$" },
            },
          },
        },
      },
    },
  },
} as const;
