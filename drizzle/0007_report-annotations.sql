CREATE TABLE `saved_comparisons` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`name` varchar(80) NOT NULL,
	`session_ids` longtext NOT NULL,
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `saved_comparisons_id` PRIMARY KEY(`id`),
	CONSTRAINT `saved_comparisons_team_name_idx` UNIQUE(`team_id`,`name`)
);
--> statement-breakpoint
CREATE TABLE `session_annotations` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`session_id` varchar(36) NOT NULL,
	`band_min_kmh` double,
	`band_max_kmh` double,
	`body` varchar(500) NOT NULL,
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `session_annotations_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `saved_comparisons` ADD CONSTRAINT `saved_comparisons_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `saved_comparisons` ADD CONSTRAINT `saved_comparisons_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_annotations` ADD CONSTRAINT `session_annotations_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_annotations` ADD CONSTRAINT `session_annotations_session_id_analysis_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `analysis_sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_annotations` ADD CONSTRAINT `session_annotations_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `session_annotations_session_idx` ON `session_annotations` (`session_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `session_annotations_team_idx` ON `session_annotations` (`team_id`);