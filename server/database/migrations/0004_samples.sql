CREATE TABLE `sample_bank_status` (
	`client_id` text PRIMARY KEY NOT NULL,
	`summary` text NOT NULL,
	`restock_due` integer DEFAULT false NOT NULL,
	`restock_episode` integer DEFAULT 0 NOT NULL,
	`restock_due_since` integer,
	`reminder_queued_at` integer,
	`checked_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `sample_bank_status_checked_idx` ON `sample_bank_status` (`checked_at`);--> statement-breakpoint
CREATE TABLE `sample_containers` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`kind` text NOT NULL,
	`label` text NOT NULL,
	`created_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `sample_containers_client_idx` ON `sample_containers` (`client_id`);--> statement-breakpoint
CREATE TABLE `sample_outer_bags` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`kind` text NOT NULL,
	`label` text NOT NULL,
	`container_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`container_id`) REFERENCES `sample_containers`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `sample_outer_bags_client_idx` ON `sample_outer_bags` (`client_id`);--> statement-breakpoint
CREATE INDEX `sample_outer_bags_container_idx` ON `sample_outer_bags` (`container_id`);--> statement-breakpoint
CREATE TABLE `sample_uses` (
	`id` text PRIMARY KEY NOT NULL,
	`sample_id` text NOT NULL,
	`client_id` text NOT NULL,
	`out_at` integer NOT NULL,
	`back_at` integer,
	`discarded` integer DEFAULT false NOT NULL,
	`stage` text NOT NULL,
	`session_ref` text,
	`over_limit` integer DEFAULT false NOT NULL,
	`recorded_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`sample_id`) REFERENCES `samples`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`recorded_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `sample_uses_sample_idx` ON `sample_uses` (`sample_id`,`out_at`);--> statement-breakpoint
CREATE INDEX `sample_uses_client_idx` ON `sample_uses` (`client_id`,`out_at`);--> statement-breakpoint
CREATE TABLE `samples` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`kind` text NOT NULL,
	`bag_code` text NOT NULL,
	`collected_at` integer NOT NULL,
	`first_symptoms_at` integer,
	`collector_id` text,
	`rolls` integer NOT NULL,
	`answers` text,
	`answers_completed_at` integer,
	`compromised` integer DEFAULT false NOT NULL,
	`compromised_reasons` text,
	`override_reason` text,
	`override_by_id` text,
	`outer_bag_id` text,
	`discarded_at` integer,
	`discard_reason` text,
	`notes` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`collector_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`override_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`outer_bag_id`) REFERENCES `sample_outer_bags`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `samples_client_code_unique` ON `samples` (`client_id`,`bag_code`);--> statement-breakpoint
CREATE INDEX `samples_client_idx` ON `samples` (`client_id`,`collected_at`);--> statement-breakpoint
CREATE INDEX `samples_outer_bag_idx` ON `samples` (`outer_bag_id`);