ALTER TABLE `clients` ADD `programme_template_id` text;--> statement-breakpoint
ALTER TABLE `invoices` ADD `checkout_nonce` text;--> statement-breakpoint
ALTER TABLE `programme_templates` ADD `archived_at` integer;