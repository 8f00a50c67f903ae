CREATE TABLE `dog_assessments` (
	`id` text PRIMARY KEY NOT NULL,
	`dog_id` text NOT NULL,
	`assessed_on` text NOT NULL,
	`assessor_id` text,
	`scores` text NOT NULL,
	`notes` text,
	`outcome` text NOT NULL,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`dog_id`) REFERENCES `dogs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`assessor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `dog_assessments_dog_idx` ON `dog_assessments` (`dog_id`,`assessed_on`);--> statement-breakpoint
CREATE TABLE `dog_health_records` (
	`id` text PRIMARY KEY NOT NULL,
	`dog_id` text NOT NULL,
	`kind` text NOT NULL,
	`name` text NOT NULL,
	`done_on` text NOT NULL,
	`due_on` text,
	`note` text,
	`created_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`dog_id`) REFERENCES `dogs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `dog_health_records_dog_idx` ON `dog_health_records` (`dog_id`,`due_on`);--> statement-breakpoint
CREATE TABLE `dog_status_changes` (
	`id` text PRIMARY KEY NOT NULL,
	`dog_id` text NOT NULL,
	`status` text NOT NULL,
	`effective_on` text NOT NULL,
	`note` text,
	`changed_by_id` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsec') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`dog_id`) REFERENCES `dogs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`changed_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `dog_status_changes_dog_idx` ON `dog_status_changes` (`dog_id`,`effective_on`);--> statement-breakpoint
ALTER TABLE `dogs` ADD `accepted_on` text;--> statement-breakpoint
ALTER TABLE `dogs` ADD `notes` text;--> statement-breakpoint
CREATE UNIQUE INDEX `dogs_microchip_unique` ON `dogs` (`microchip`);