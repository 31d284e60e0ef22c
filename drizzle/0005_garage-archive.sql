ALTER TABLE `cars` ADD `archived_at` timestamp(3);--> statement-breakpoint
ALTER TABLE `setups` ADD `archived_at` timestamp(3);