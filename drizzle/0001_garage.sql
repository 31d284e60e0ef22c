CREATE TABLE `cars` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`name` varchar(80) NOT NULL,
	`category` varchar(60),
	`wheelbase_mm` double NOT NULL,
	`track_front_mm` double,
	`track_rear_mm` double,
	`cog_height_mm` double NOT NULL,
	`steering_ratio` double NOT NULL,
	`tyre_vertical_stiffness_n_per_mm` double,
	`fuel_tank_from_front_axle_mm` double,
	`fuel_density_kg_per_l` double NOT NULL DEFAULT 0.745,
	`corner_fl_kg` double,
	`corner_fr_kg` double,
	`corner_rl_kg` double,
	`corner_rr_kg` double,
	`weighed_with_driver` boolean NOT NULL DEFAULT false,
	`weighed_fuel_l` double,
	`mass_kg` double NOT NULL,
	`static_front_weight_pct` double NOT NULL,
	`notes` text,
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	`updated_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `cars_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `setup_sheets` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`car_id` varchar(36) NOT NULL,
	`name` varchar(80) NOT NULL,
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `setup_sheets_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `setups` (
	`id` varchar(36) NOT NULL,
	`sheet_id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`car_id` varchar(36) NOT NULL,
	`version` int NOT NULL,
	`front_spring_rate_n_per_mm` double NOT NULL,
	`rear_spring_rate_n_per_mm` double NOT NULL,
	`front_motion_ratio` double NOT NULL,
	`rear_motion_ratio` double NOT NULL,
	`front_bump_stop_kind` varchar(8) NOT NULL DEFAULT 'none',
	`front_bump_stop_gap_mm` double,
	`front_bump_stop_rate_n_per_mm` double,
	`front_bump_stop_table` longtext,
	`rear_bump_stop_kind` varchar(8) NOT NULL DEFAULT 'none',
	`rear_bump_stop_gap_mm` double,
	`rear_bump_stop_rate_n_per_mm` double,
	`rear_bump_stop_table` longtext,
	`static_damper_fl_mm` double,
	`static_damper_fr_mm` double,
	`static_damper_rl_mm` double,
	`static_damper_rr_mm` double,
	`ride_height_front_mm` double,
	`ride_height_rear_mm` double,
	`arb_front` varchar(60),
	`arb_rear` varchar(60),
	`rear_wing_angle_deg` double,
	`rear_wing_step` varchar(40),
	`front_aero` varchar(120),
	`aero_notes` text,
	`notes` text,
	`change_note` varchar(200),
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	`updated_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `setups_id` PRIMARY KEY(`id`),
	CONSTRAINT `setups_sheet_version_idx` UNIQUE(`sheet_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `analysis_sessions` (
	`id` varchar(36) NOT NULL,
	`team_id` varchar(36) NOT NULL,
	`car_id` varchar(36) NOT NULL,
	`setup_id` varchar(36) NOT NULL,
	`name` varchar(120) NOT NULL,
	`recorded_at` timestamp(3),
	`status` enum('received','read','checked','flagged') NOT NULL DEFAULT 'received',
	`summary_version` int,
	`summary` longtext,
	`created_by` varchar(36),
	`created_at` timestamp(3) NOT NULL DEFAULT (now()),
	CONSTRAINT `analysis_sessions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `session_bands` (
	`session_id` varchar(36) NOT NULL,
	`min_kmh` double NOT NULL,
	`max_kmh` double NOT NULL,
	`samples` int NOT NULL,
	`aero_load_front_n` double,
	`aero_load_rear_n` double,
	`balance_front_pct` double,
	`understeer_gradient_deg_per_g` double,
	`understeer_samples` int NOT NULL DEFAULT 0,
	CONSTRAINT `session_bands_session_id_min_kmh_pk` PRIMARY KEY(`session_id`,`min_kmh`)
);
--> statement-breakpoint
ALTER TABLE `cars` ADD CONSTRAINT `cars_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `cars` ADD CONSTRAINT `cars_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `setup_sheets` ADD CONSTRAINT `setup_sheets_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `setup_sheets` ADD CONSTRAINT `setup_sheets_car_id_cars_id_fk` FOREIGN KEY (`car_id`) REFERENCES `cars`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `setup_sheets` ADD CONSTRAINT `setup_sheets_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `setups` ADD CONSTRAINT `setups_sheet_id_setup_sheets_id_fk` FOREIGN KEY (`sheet_id`) REFERENCES `setup_sheets`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `setups` ADD CONSTRAINT `setups_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `setups` ADD CONSTRAINT `setups_car_id_cars_id_fk` FOREIGN KEY (`car_id`) REFERENCES `cars`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `setups` ADD CONSTRAINT `setups_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD CONSTRAINT `analysis_sessions_team_id_organization_id_fk` FOREIGN KEY (`team_id`) REFERENCES `organization`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD CONSTRAINT `analysis_sessions_car_id_cars_id_fk` FOREIGN KEY (`car_id`) REFERENCES `cars`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD CONSTRAINT `analysis_sessions_setup_id_setups_id_fk` FOREIGN KEY (`setup_id`) REFERENCES `setups`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_sessions` ADD CONSTRAINT `analysis_sessions_created_by_user_id_fk` FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_bands` ADD CONSTRAINT `session_bands_session_id_analysis_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `analysis_sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `cars_team_id_idx` ON `cars` (`team_id`);--> statement-breakpoint
CREATE INDEX `setup_sheets_team_id_idx` ON `setup_sheets` (`team_id`);--> statement-breakpoint
CREATE INDEX `setup_sheets_car_id_idx` ON `setup_sheets` (`car_id`);--> statement-breakpoint
CREATE INDEX `setups_team_id_idx` ON `setups` (`team_id`);--> statement-breakpoint
CREATE INDEX `setups_car_id_idx` ON `setups` (`car_id`);--> statement-breakpoint
CREATE INDEX `analysis_sessions_team_id_idx` ON `analysis_sessions` (`team_id`);--> statement-breakpoint
CREATE INDEX `analysis_sessions_car_id_idx` ON `analysis_sessions` (`car_id`);--> statement-breakpoint
CREATE INDEX `analysis_sessions_setup_id_idx` ON `analysis_sessions` (`setup_id`);