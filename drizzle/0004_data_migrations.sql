CREATE TABLE `data_migration` (
	`name` text PRIMARY KEY NOT NULL,
	`applied_at` integer NOT NULL,
	`detail` text DEFAULT '{}' NOT NULL
);
