CREATE TABLE `business_logos` (
	`id` text PRIMARY KEY NOT NULL,
	`mime` text NOT NULL,
	`bytes` blob NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL
);
--> statement-breakpoint
CREATE TABLE `invoice_refunds` (
	`id` text PRIMARY KEY NOT NULL,
	`invoice_id` text NOT NULL,
	`amount_minor` integer NOT NULL,
	`method` text NOT NULL,
	`reference` text,
	`paid_on` text NOT NULL,
	`recorded_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`invoice_id`) REFERENCES `invoices`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`recorded_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `invoice_refunds_invoice_idx` ON `invoice_refunds` (`invoice_id`);--> statement-breakpoint
CREATE TABLE `payment_problems` (
	`id` text PRIMARY KEY NOT NULL,
	`event_id` text NOT NULL,
	`invoice_id` text,
	`kind` text NOT NULL,
	`amount_minor` integer,
	`currency` text,
	`reference` text,
	`detail` text NOT NULL,
	`resolved_at` integer,
	`resolved_by_id` text,
	`resolution` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`resolved_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `payment_problems_event_uq` ON `payment_problems` (`event_id`);--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_name` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_address_line` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_town` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_postcode` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_country` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `programme_template_id` text;--> statement-breakpoint
ALTER TABLE `invoice_payments` ADD `receipt_number` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `checkout_session_id` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `checkout_nonce` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `refunded_minor` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `invoices` ADD `frozen` text;--> statement-breakpoint
ALTER TABLE `programme_templates` ADD `archived_at` integer;