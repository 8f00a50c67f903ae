CREATE TABLE `homework_assignments` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`dog_id` text,
	`milestone_id` text,
	`exercise_id` text,
	`title` text NOT NULL,
	`instructions` text NOT NULL,
	`due_day` text NOT NULL,
	`expected_videos` integer DEFAULT 1 NOT NULL,
	`state` text DEFAULT 'open' NOT NULL,
	`set_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`dog_id`) REFERENCES `dogs`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`milestone_id`) REFERENCES `client_milestones`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`exercise_id`) REFERENCES `homework_exercises`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`set_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `homework_assignments_client_idx` ON `homework_assignments` (`client_id`,`state`,`due_day`);--> statement-breakpoint
CREATE TABLE `homework_comments` (
	`id` text PRIMARY KEY NOT NULL,
	`video_id` text NOT NULL,
	`author_id` text,
	`at_seconds` real NOT NULL,
	`body` text NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`video_id`) REFERENCES `homework_videos`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `homework_comments_video_idx` ON `homework_comments` (`video_id`,`at_seconds`);--> statement-breakpoint
CREATE TABLE `homework_exercises` (
	`id` text PRIMARY KEY NOT NULL,
	`title` text NOT NULL,
	`instructions` text NOT NULL,
	`expected_videos` integer DEFAULT 1 NOT NULL,
	`created_by_id` text,
	`archived_at` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE TABLE `homework_uploads` (
	`id` text PRIMARY KEY NOT NULL,
	`assignment_id` text NOT NULL,
	`client_id` text NOT NULL,
	`uploaded_by_id` text NOT NULL,
	`file_name` text NOT NULL,
	`declared_size` integer NOT NULL,
	`expires_at` integer NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`assignment_id`) REFERENCES `homework_assignments`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`uploaded_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `homework_uploads_expires_idx` ON `homework_uploads` (`expires_at`);--> statement-breakpoint
CREATE TABLE `homework_videos` (
	`id` text PRIMARY KEY NOT NULL,
	`assignment_id` text NOT NULL,
	`client_id` text NOT NULL,
	`uploaded_by_id` text,
	`file_name` text NOT NULL,
	`content_type` text NOT NULL,
	`size` integer NOT NULL,
	`storage_key` text NOT NULL,
	`duration_seconds` real,
	`note` text,
	`review_outcome` text,
	`review_notes` text,
	`reviewed_at` integer,
	`reviewed_by_id` text,
	`next_assignment_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`assignment_id`) REFERENCES `homework_assignments`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`uploaded_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`reviewed_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`next_assignment_id`) REFERENCES `homework_assignments`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `homework_videos_assignment_idx` ON `homework_videos` (`assignment_id`);--> statement-breakpoint
CREATE INDEX `homework_videos_review_idx` ON `homework_videos` (`client_id`,`reviewed_at`,`created_at`);