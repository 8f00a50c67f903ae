CREATE TABLE `business_logos` (
	`id` text PRIMARY KEY NOT NULL,
	`mime` text NOT NULL,
	`bytes` blob NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL
);
--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_name` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_address_line` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_town` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_postcode` text;--> statement-breakpoint
ALTER TABLE `clients` ADD `billing_country` text;--> statement-breakpoint
ALTER TABLE `invoice_payments` ADD `receipt_number` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `frozen` text;