ALTER TABLE `session_bands` ADD `aero_samples` int DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `session_bands` ADD `balance_front_ci95_lo_pct` double;--> statement-breakpoint
ALTER TABLE `session_bands` ADD `balance_front_ci95_hi_pct` double;--> statement-breakpoint
ALTER TABLE `session_bands` ADD `understeer_ci95_lo_deg_per_g` double;--> statement-breakpoint
ALTER TABLE `session_bands` ADD `understeer_ci95_hi_deg_per_g` double;