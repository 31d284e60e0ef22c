CREATE TABLE `brief_links` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`session_id` varchar(36) NOT NULL,
	`token_hash` char(64) NOT NULL,
	`note` varchar(500),
	`recipient_user_id` varchar(36),
	`recipient_email` varchar(255),
	`expires_at` timestamp(3) NOT NULL,
	`revoked_at` timestamp(3),
	`view_count` int NOT NULL DEFAULT 0,
	`last_viewed_at` timestamp(3),
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `brief_links_id` PRIMARY KEY(`id`),
	CONSTRAINT `brief_links_token_hash_idx` UNIQUE(`token_hash`)
);
--> statement-breakpoint
ALTER TABLE `brief_links` ADD CONSTRAINT `brief_links_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `brief_links` ADD CONSTRAINT `brief_links_session_id_analysis_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `analysis_sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `brief_links` ADD CONSTRAINT `brief_links_recipient_user_id_user_id_fk` FOREIGN KEY (`recipient_user_id`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `brief_links` ADD CONSTRAINT `brief_links_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `brief_links_team_idx` ON `brief_links` (`team_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `brief_links_recipient_idx` ON `brief_links` (`recipient_user_id`);