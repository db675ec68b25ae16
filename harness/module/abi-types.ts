/** The shape of the ABI table (abi/areal.abi.json) as the generated harness/module/abi-table.ts holds it. */

export interface AbiStatus {
  readonly code: number;
  /** The constant's name in assembly/status.ts (AREAL_ prefixed in include/areal.h). */
  readonly const: string;
  /** The word written in CSV `status` columns. */
  readonly word: string;
  readonly meaning: string;
}

export interface AbiEnum {
  readonly name: string;
  readonly const: string;
  readonly doc: string;
  readonly values: readonly { readonly word: string; readonly value: number; readonly doc: string }[];
}

export interface AbiParam {
  readonly name: string;
  /** "real" (f64 or f32 per module) unless "i32". */
  readonly type?: "real" | "i32";
  readonly unit?: string;
  readonly doc?: string;
  /** Used by `areal eval` when the column is absent. */
  readonly default?: number;
  /** An enumerated i32 argument: the name of an entry of `enums`. */
  readonly enum?: string;
}

export interface AbiOutput {
  readonly name: string;
  readonly unit: string;
  readonly doc?: string;
}

export interface AbiExport {
  readonly name: string;
  readonly group: string;
  readonly summary: string;
  /** The `areal eval` name, when the export is a routine of its own. */
  readonly routine?: string;
  /** The routine this export serves when a row has its columns instead (state_p for state). */
  readonly alternative_of?: string;
  readonly params: readonly AbiParam[];
  /** Output slot i is outputs[i]. */
  readonly outputs: readonly AbiOutput[];
  /** The named layout the outputs come from, when shared by several exports. */
  readonly layout?: string;
  /** The output columns `areal eval` writes, when not every slot. */
  readonly columns?: readonly string[];
  readonly statuses_used?: string;
}

export interface AbiTable {
  readonly abi_version: number;
  readonly out_slots: number;
  readonly first_error: number;
  readonly statuses: readonly AbiStatus[];
  readonly enums: readonly AbiEnum[];
  readonly groups: readonly { readonly name: string; readonly title: string }[];
  readonly exports: readonly AbiExport[];
}
