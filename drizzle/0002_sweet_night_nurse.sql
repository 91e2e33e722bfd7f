CREATE TABLE `api_tokens` (
	`id` text PRIMARY KEY NOT NULL,
	`firm_id` text NOT NULL,
	`user_id` text NOT NULL,
	`membership_id` text NOT NULL,
	`name` text NOT NULL,
	`roles` text NOT NULL,
	`token_hash` text NOT NULL,
	`hint` text NOT NULL,
	`expires_at` integer,
	`last_used_at` integer,
	`revoked_at` integer,
	`revoked_by` text,
	`created_at` integer DEFAULT (CAST(unixepoch('subsec') * 1000 AS INTEGER)) NOT NULL,
	FOREIGN KEY (`firm_id`) REFERENCES `firms`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`revoked_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `api_tokens_token_hash_unique` ON `api_tokens` (`token_hash`);--> statement-breakpoint
CREATE INDEX `api_tokens_firm_idx` ON `api_tokens` (`firm_id`,`user_id`);--> statement-breakpoint
CREATE TABLE `run_batch_runs` (
	`batch_id` text NOT NULL,
	`run_id` text NOT NULL,
	`position` integer NOT NULL,
	FOREIGN KEY (`batch_id`) REFERENCES `run_batches`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `run_batch_runs_position_unique` ON `run_batch_runs` (`batch_id`,`position`);--> statement-breakpoint
CREATE UNIQUE INDEX `run_batch_runs_run_unique` ON `run_batch_runs` (`run_id`);--> statement-breakpoint
CREATE TABLE `run_batches` (
	`id` text PRIMARY KEY NOT NULL,
	`firm_id` text NOT NULL,
	`project_id` text,
	`settings` text NOT NULL,
	`created_by` text NOT NULL,
	`created_at` integer DEFAULT (CAST(unixepoch('subsec') * 1000 AS INTEGER)) NOT NULL,
	FOREIGN KEY (`firm_id`) REFERENCES `firms`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`project_id`) REFERENCES `projects`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `run_batches_firm_idx` ON `run_batches` (`firm_id`,`created_at`);--> statement-breakpoint
ALTER TABLE `memberships` ADD `units` text DEFAULT 'si' NOT NULL;--> statement-breakpoint
ALTER TABLE `projects` ADD `archived_at` integer;