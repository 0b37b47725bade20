ALTER TABLE `dataset_version` ADD `identifiers_findable_at` integer;--> statement-breakpoint
-- versions published before identifiers were reserved as drafts were registered findable at once
UPDATE `dataset_version` SET `identifiers_findable_at` = `published_at` WHERE `doi` IS NOT NULL AND `state` IN ('published', 'withdrawn');
