ALTER TABLE `training_trials` ADD `entry_key` text;--> statement-breakpoint
CREATE UNIQUE INDEX `training_trials_entry_key_unique` ON `training_trials` (`session_id`,`entry_key`);