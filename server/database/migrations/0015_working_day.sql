CREATE TABLE `appointment_series` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`rrule` text NOT NULL,
	`time_zone` text NOT NULL,
	`sequence` integer DEFAULT 0 NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `appointment_series_client_idx` ON `appointment_series` (`client_id`);--> statement-breakpoint
CREATE TABLE `appointments` (
	`id` text PRIMARY KEY NOT NULL,
	`series_id` text,
	`client_id` text NOT NULL,
	`trainer_id` text NOT NULL,
	`dog_id` text,
	`kind` text NOT NULL,
	`starts_at` integer NOT NULL,
	`original_starts_at` integer NOT NULL,
	`duration_minutes` integer NOT NULL,
	`time_zone` text NOT NULL,
	`place` text,
	`household_notes` text,
	`private_notes` text,
	`status` text DEFAULT 'scheduled' NOT NULL,
	`cancel_reason` text,
	`sequence` integer DEFAULT 0 NOT NULL,
	`created_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`series_id`) REFERENCES `appointment_series`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`trainer_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`dog_id`) REFERENCES `dogs`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `appointments_trainer_idx` ON `appointments` (`trainer_id`,`starts_at`);--> statement-breakpoint
CREATE INDEX `appointments_client_idx` ON `appointments` (`client_id`,`starts_at`);--> statement-breakpoint
CREATE INDEX `appointments_series_idx` ON `appointments` (`series_id`,`original_starts_at`);--> statement-breakpoint
CREATE INDEX `appointments_starts_idx` ON `appointments` (`starts_at`);--> statement-breakpoint
CREATE TABLE `calendar_feeds` (
	`user_id` text PRIMARY KEY NOT NULL,
	`feed_key` text NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `calendar_feeds_key_unique` ON `calendar_feeds` (`feed_key`);--> statement-breakpoint
CREATE TABLE `message_notices` (
	`user_id` text PRIMARY KEY NOT NULL,
	`noticed_at` integer NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `message_reads` (
	`client_id` text NOT NULL,
	`user_id` text NOT NULL,
	`read_at` integer NOT NULL,
	PRIMARY KEY(`client_id`, `user_id`),
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `message_reads_user_idx` ON `message_reads` (`user_id`);--> statement-breakpoint
CREATE TABLE `messages` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`author_id` text,
	`body` text NOT NULL,
	`homework_video_id` text,
	`attachment_key` text,
	`attachment_name` text,
	`attachment_type` text,
	`attachment_bytes` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`homework_video_id`) REFERENCES `homework_videos`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `messages_client_idx` ON `messages` (`client_id`,`created_at`);--> statement-breakpoint
CREATE TABLE `reminder_preferences` (
	`user_id` text NOT NULL,
	`kind` text NOT NULL,
	`enabled` integer NOT NULL,
	PRIMARY KEY(`user_id`, `kind`),
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
