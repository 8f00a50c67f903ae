CREATE TABLE `fee_schedules` (
	`id` text PRIMARY KEY NOT NULL,
	`template_id` text NOT NULL,
	`currency` text NOT NULL,
	`tax_rate_bp` integer NOT NULL,
	`deposit_minor` integer NOT NULL,
	`instalment_count` integer NOT NULL,
	`interval_months` integer DEFAULT 1 NOT NULL,
	`lines` text NOT NULL,
	`updated_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`template_id`) REFERENCES `programme_templates`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`updated_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `fee_schedules_template_uq` ON `fee_schedules` (`template_id`);--> statement-breakpoint
ALTER TABLE `outbox` ADD `attachments` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `fee_schedule_id` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `plan_part` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `scheduled_issue_on` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `reminders_sent` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `invoices` ADD `last_reminded_at` integer;--> statement-breakpoint
CREATE UNIQUE INDEX `invoices_plan_part_uq` ON `invoices` (`client_id`,`fee_schedule_id`,`plan_part`);--> statement-breakpoint
CREATE INDEX `invoices_scheduled_idx` ON `invoices` (`status`,`scheduled_issue_on`);