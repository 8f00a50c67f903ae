CREATE TABLE `stripe_events` (
	`id` text PRIMARY KEY NOT NULL,
	`type` text NOT NULL,
	`invoice_id` text,
	`outcome` text NOT NULL,
	`received_at` integer NOT NULL
);
