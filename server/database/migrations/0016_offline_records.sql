CREATE TABLE `bag_code_prefixes` (
	`prefix` text PRIMARY KEY NOT NULL,
	`reserved_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`reserved_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `bag_code_prefixes_user_idx` ON `bag_code_prefixes` (`reserved_by_id`);--> statement-breakpoint
CREATE TABLE `homework_notes` (
	`id` text PRIMARY KEY NOT NULL,
	`assignment_id` text NOT NULL,
	`client_id` text NOT NULL,
	`author_id` text,
	`practised_at` integer NOT NULL,
	`body` text NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`assignment_id`) REFERENCES `homework_assignments`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`client_id`) REFERENCES `clients`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `homework_notes_assignment_idx` ON `homework_notes` (`assignment_id`,`practised_at`);