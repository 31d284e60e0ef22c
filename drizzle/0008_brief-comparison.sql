ALTER TABLE `brief_links` MODIFY COLUMN `session_id` varchar(36);--> statement-breakpoint
ALTER TABLE `brief_links` ADD `comparison_id` varchar(36);--> statement-breakpoint
ALTER TABLE `brief_links` ADD CONSTRAINT `brief_links_one_subject` CHECK ((session_id is null) <> (comparison_id is null));--> statement-breakpoint
ALTER TABLE `brief_links` ADD CONSTRAINT `brief_links_comparison_id_saved_comparisons_id_fk` FOREIGN KEY (`comparison_id`) REFERENCES `saved_comparisons`(`id`) ON DELETE cascade ON UPDATE no action;