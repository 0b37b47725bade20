CREATE TABLE `structure` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`smiles` text NOT NULL,
	`canonical_smiles` text,
	`inchi` text,
	`inchi_key` text,
	`svg` text,
	`morgan_fp` text,
	`error` text,
	`toolkit` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `structure_smiles_unique` ON `structure` (`smiles`);--> statement-breakpoint
CREATE INDEX `structure_inchi_key_idx` ON `structure` (`inchi_key`);