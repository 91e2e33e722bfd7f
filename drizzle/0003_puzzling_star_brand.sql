ALTER TABLE `records` ADD `parent_id` text REFERENCES records(id);--> statement-breakpoint
ALTER TABLE `records` ADD `processing` text;--> statement-breakpoint
CREATE INDEX `records_parent_idx` ON `records` (`parent_id`);