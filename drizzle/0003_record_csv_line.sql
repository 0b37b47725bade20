ALTER TABLE `rate_record` ADD `csv_line` text;--> statement-breakpoint
ALTER TABLE `rate_record` ADD `csv_format` integer;