CREATE TABLE `revoked_session` (
	`sid` text PRIMARY KEY NOT NULL,
	`expires_at` integer NOT NULL
);
--> statement-breakpoint
CREATE INDEX `revoked_session_expires_idx` ON `revoked_session` (`expires_at`);--> statement-breakpoint
ALTER TABLE `user` ADD `session_version` integer DEFAULT 0 NOT NULL;