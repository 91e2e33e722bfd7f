ALTER TABLE `comparisons` ADD `mean_kind` text DEFAULT 'arithmetic' NOT NULL;--> statement-breakpoint
ALTER TABLE `comparisons` ADD `combination` text;--> statement-breakpoint
ALTER TABLE `comparisons` ADD `revision_of` text;