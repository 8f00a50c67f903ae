CREATE TABLE `client_milestones` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`position` integer NOT NULL,
	`name` text NOT NULL,
	`handler_text` text NOT NULL,
	`measured` integer DEFAULT false NOT NULL,
	`criteria` text,
	`confirmed_at` integer,
	`confirmed_by_id` text,
	`confirm_reason` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`confirmed_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `client_milestones_position_unique` ON `client_milestones` (`client_id`,`position`);--> statement-breakpoint
CREATE TABLE `programme_templates` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`is_default` integer DEFAULT false NOT NULL,
	`milestones` text NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL
);
--> statement-breakpoint
CREATE TABLE `training_sessions` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`dog_id` text NOT NULL,
	`run_by` text NOT NULL,
	`run_by_id` text,
	`day` text NOT NULL,
	`place` text,
	`stage` text NOT NULL,
	`conditions` text,
	`notes` text,
	`blind` integer DEFAULT false NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`dog_id`) REFERENCES `dogs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`run_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `training_sessions_client_idx` ON `training_sessions` (`client_id`,`day`);--> statement-breakpoint
CREATE TABLE `training_trials` (
	`id` text PRIMARY KEY NOT NULL,
	`session_id` text NOT NULL,
	`client_id` text NOT NULL,
	`stations` integer NOT NULL,
	`target_station` integer,
	`indicated_station` integer,
	`latency_seconds` real,
	`notes` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`session_id`) REFERENCES `training_sessions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `training_trials_session_idx` ON `training_trials` (`session_id`);--> statement-breakpoint
CREATE INDEX `training_trials_client_idx` ON `training_trials` (`client_id`);