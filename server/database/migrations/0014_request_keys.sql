CREATE TABLE `request_keys` (
	`key` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`method` text NOT NULL,
	`path` text NOT NULL,
	`body_hash` text,
	`state` text NOT NULL,
	`status_code` integer,
	`response` text,
	`tapped_at` integer,
	`received_at` integer NOT NULL,
	`completed_at` integer,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `request_keys_user_idx` ON `request_keys` (`user_id`,`received_at`);