CREATE TABLE `logger_profiles` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`name` varchar(80) NOT NULL,
	`header_signature` char(64) NOT NULL,
	`columns` longtext NOT NULL,
	`map` longtext NOT NULL,
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	`last_used_at` timestamp(3),
	CONSTRAINT `logger_profiles_id` PRIMARY KEY(`id`),
	CONSTRAINT `logger_profiles_team_name_idx` UNIQUE(`team_id`,`name`)
);
--> statement-breakpoint
CREATE TABLE `raw_uploads` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`user_id` varchar(36),
	`storage` varchar(8) NOT NULL,
	`storage_key` varchar(300) NOT NULL,
	`file_name` varchar(255) NOT NULL,
	`sha256` char(64) NOT NULL,
	`bytes` bigint NOT NULL,
	`status` enum('stored','attached') NOT NULL DEFAULT 'stored',
	`session_id` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `raw_uploads_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `session_results` (
	`id` varchar(36) NOT NULL,
	`session_id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`origin` varchar(8) NOT NULL,
	`reason` varchar(16) NOT NULL,
	`engine_version` varchar(40),
	`summary_version` int,
	`setup_id` varchar(36),
	`summary` longtext,
	`options` longtext,
	`diff` longtext,
	`error` text,
	`job_id` bigint,
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `session_results_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `venues` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`name` varchar(80) NOT NULL,
	`altitude_m` double,
	`notes` varchar(200),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `venues_id` PRIMARY KEY(`id`),
	CONSTRAINT `venues_team_name_idx` UNIQUE(`team_id`,`name`)
);
--> statement-breakpoint
CREATE TABLE `jobs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`kind` varchar(32) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`session_id` varchar(36),
	`payload` longtext,
	`status` enum('queued','running','done','failed') NOT NULL DEFAULT 'queued',
	`attempts` int NOT NULL DEFAULT 0,
	`max_attempts` int NOT NULL DEFAULT 3,
	`run_after` timestamp(3) NOT NULL DEFAULT (now()),
	`lease_owner` varchar(80),
	`lease_expires_at` timestamp(3),
	`heartbeat_at` timestamp(3),
	`error` text,
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	`started_at` timestamp(3),
	`finished_at` timestamp(3),
	CONSTRAINT `jobs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `api_tokens` (
	`id` varchar(36) NOT NULL,
	`user_id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`name` varchar(80) NOT NULL,
	`token_hash` char(64) NOT NULL,
	`token_prefix` varchar(16) NOT NULL,
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	`last_used_at` timestamp(3),
	`revoked_at` timestamp(3),
	CONSTRAINT `api_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `api_tokens_token_hash_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `session_date` date;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `venue_id` varchar(36);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `run_label` varchar(80);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `driver_user_id` varchar(36);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `driver_name` varchar(120);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `air_temp_c` double;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `air_pressure_hpa` double;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `air_humidity_pct` double;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `air_source` varchar(16);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `fuel_start_l` double;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `fuel_end_l` double;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `fuel_density_kg_per_l` double;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `tyre_notes` text;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `notes` text;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `source` varchar(8) DEFAULT 'browser' NOT NULL;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `raw_upload_id` varchar(36);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `raw_file_name` varchar(255);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `raw_sha256` char(64);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `raw_bytes` bigint;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `channel_map` longtext;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `analysis_options` longtext;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `engine_version` varchar(40);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `traces` longtext;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `browser_summary` longtext;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `recheck_diff` longtext;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `status_detail` text;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `checked_at` timestamp(3);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD `updated_at` timestamp(3) DEFAULT (now()) NOT NULL;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD CONSTRAINT `analysis_sessions_team_sha_idx` UNIQUE(`team_id`,`raw_sha256`);--> statement-breakpoint
ALTER TABLE `logger_profiles` ADD CONSTRAINT `logger_profiles_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `logger_profiles` ADD CONSTRAINT `logger_profiles_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `raw_uploads` ADD CONSTRAINT `raw_uploads_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `raw_uploads` ADD CONSTRAINT `raw_uploads_user_id_user_id_fk` FOREIGN KEY (`user_id`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_results` ADD CONSTRAINT `session_results_session_id_analysis_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `analysis_sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_results` ADD CONSTRAINT `session_results_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_results` ADD CONSTRAINT `session_results_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `venues` ADD CONSTRAINT `venues_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `jobs` ADD CONSTRAINT `jobs_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `jobs` ADD CONSTRAINT `jobs_session_id_analysis_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `analysis_sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `api_tokens` ADD CONSTRAINT `api_tokens_user_id_user_id_fk` FOREIGN KEY (`user_id`) REFERENCES `user`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `api_tokens` ADD CONSTRAINT `api_tokens_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `logger_profiles_team_sig_idx` ON `logger_profiles` (`team_id`,`header_signature`);--> statement-breakpoint
CREATE INDEX `raw_uploads_team_sha_idx` ON `raw_uploads` (`team_id`,`sha256`);--> statement-breakpoint
CREATE INDEX `raw_uploads_status_idx` ON `raw_uploads` (`status`,`created_at`);--> statement-breakpoint
CREATE INDEX `session_results_session_idx` ON `session_results` (`session_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `jobs_status_due_idx` ON `jobs` (`status`,`run_after`);--> statement-breakpoint
CREATE INDEX `jobs_lease_idx` ON `jobs` (`status`,`lease_expires_at`);--> statement-breakpoint
CREATE INDEX `jobs_session_idx` ON `jobs` (`session_id`);--> statement-breakpoint
CREATE INDEX `api_tokens_user_idx` ON `api_tokens` (`user_id`);--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD CONSTRAINT `analysis_sessions_venue_id_venues_id_fk` FOREIGN KEY (`venue_id`) REFERENCES `venues`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD CONSTRAINT `analysis_sessions_driver_user_id_user_id_fk` FOREIGN KEY (`driver_user_id`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `analysis_sessions_team_date_idx` ON `analysis_sessions` (`team_id`,`session_date`);