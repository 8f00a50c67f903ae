CREATE TABLE `diary_entries` (
	`id` text PRIMARY KEY NOT NULL,
	`client_id` text NOT NULL,
	`kind` text NOT NULL,
	`occurred_at` integer NOT NULL,
	`behaviour` text,
	`place` text,
	`confidence` text,
	`severity` text,
	`action` text,
	`notes` text,
	`created_by_id` text,
	`reviewed_at` integer,
	`reviewed_by_id` text,
	`review_comment` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`reviewed_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `diary_entries_client_idx` ON `diary_entries` (`client_id`,`occurred_at`);--> statement-breakpoint
CREATE TABLE `diary_windows` (
	`client_id` text PRIMARY KEY NOT NULL,
	`min_minutes` integer NOT NULL,
	`max_minutes` integer NOT NULL,
	`updated_by_id` text,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`updated_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
