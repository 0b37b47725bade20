/** Bundles: selection.ts (what) → bundle.ts (the BagIt ZIP) with texts.ts → send.ts (the answer). */
export * from './selection'
export * from './bundle'
export * from './texts'
export * from './send'
