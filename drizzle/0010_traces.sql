CREATE TABLE `trace` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`dataset_id` integer NOT NULL,
	`file_id` integer NOT NULL,
	`sha256` text NOT NULL,
	`name` text NOT NULL,
	`time_unit` text NOT NULL,
	`signal_kind` text NOT NULL,
	`wavelength_nm` real,
	`point_count` integer NOT NULL,
	`has_sigma` integer NOT NULL,
	`points` text NOT NULL,
	`uploaded_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`dataset_id`) REFERENCES `dataset`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`file_id`) REFERENCES `uploaded_file`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`uploaded_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `trace_dataset_sha_unique` ON `trace` (`dataset_id`,`sha256`);