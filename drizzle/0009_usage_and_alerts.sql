CREATE TABLE `saved_search` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`user_id` text NOT NULL,
	`name` text NOT NULL,
	`query` text NOT NULL,
	`alerts` integer DEFAULT true NOT NULL,
	`checked_until` integer NOT NULL,
	`last_digest_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `saved_search_user_name_unique` ON `saved_search` (`user_id`,`name`);--> statement-breakpoint
CREATE TABLE `usage_event` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`dataset_id` integer NOT NULL,
	`kind` text NOT NULL,
	`item` text NOT NULL,
	`session` text NOT NULL,
	`machine` integer NOT NULL,
	`at` integer NOT NULL,
	FOREIGN KEY (`dataset_id`) REFERENCES `dataset`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `usage_event_dataset_at_idx` ON `usage_event` (`dataset_id`,`at`);--> statement-breakpoint
CREATE INDEX `usage_event_at_idx` ON `usage_event` (`at`);--> statement-breakpoint
CREATE TABLE `usage_salt` (
	`day` text PRIMARY KEY NOT NULL,
	`salt` text NOT NULL
);
