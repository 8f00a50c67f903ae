CREATE TABLE `recovery_codes` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`code_hash` text NOT NULL,
	`used_at` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `recovery_codes_user_idx` ON `recovery_codes` (`user_id`);--> statement-breakpoint
ALTER TABLE `outbox` ADD `secret_link` text;--> statement-breakpoint
ALTER TABLE `password_resets` ADD `revoked_at` integer;--> statement-breakpoint
ALTER TABLE `users` ADD `totp_secret` text;--> statement-breakpoint
ALTER TABLE `users` ADD `totp_pending_secret` text;--> statement-breakpoint
ALTER TABLE `users` ADD `totp_enabled_at` integer;--> statement-breakpoint
ALTER TABLE `users` ADD `totp_last_step` integer;--> statement-breakpoint
-- Messages sent before links were minted at sending held reset and invitation links in clear: blank their bodies.
UPDATE `outbox` SET `text_body` = '(This message held a single-use link and was cleared.)', `html_body` = NULL WHERE `status` = 'sent' AND (`text_body` LIKE '%/reset-password?token=%' OR `text_body` LIKE '%/invitation/%');
