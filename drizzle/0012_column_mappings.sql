CREATE TABLE `column_mapping` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`lab_id` integer NOT NULL,
	`name` text NOT NULL,
	`signature` text NOT NULL,
	`mapping` text NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `column_mapping_lab_name_unique` ON `column_mapping` (`lab_id`,`name`);--> statement-breakpoint
CREATE INDEX `column_mapping_signature_idx` ON `column_mapping` (`lab_id`,`signature`);--> statement-breakpoint
ALTER TABLE `uploaded_file` ADD `mapping` text;