CREATE TABLE `build_parts` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`build_id` bigint unsigned NOT NULL,
	`position` int NOT NULL,
	`category` varchar(60) NOT NULL,
	`part` varchar(200) NOT NULL,
	`part_number` varchar(80) NOT NULL DEFAULT '',
	`quantity` int NOT NULL,
	`unit_price_cents` bigint unsigned NOT NULL,
	CONSTRAINT `build_parts_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `builder_profiles` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`shop_name` varchar(120) NOT NULL,
	`slug` varchar(140) NOT NULL,
	`region` varchar(80) NOT NULL,
	`bio` text NOT NULL,
	`specialties` json NOT NULL,
	`capabilities` json NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `builder_profiles_id` PRIMARY KEY(`id`),
	CONSTRAINT `builder_profiles_slug_unique` UNIQUE(`slug`),
	CONSTRAINT `builder_profiles_user_unique` UNIQUE(`user_id`)
);
--> statement-breakpoint
CREATE TABLE `builds` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`builder_id` bigint unsigned NOT NULL,
	`slug` varchar(160) NOT NULL,
	`title` varchar(160) NOT NULL,
	`summary` text NOT NULL,
	`engine_family` varchar(60) NOT NULL,
	`cylinders` int NOT NULL,
	`bore_in` decimal(7,4) NOT NULL,
	`stroke_in` decimal(7,4) NOT NULL,
	`rod_length_in` decimal(7,4) NOT NULL,
	`cylinder_heads` varchar(160) NOT NULL,
	`chamber_cc` decimal(7,2) NOT NULL,
	`piston_cc` decimal(7,2) NOT NULL,
	`gasket_bore_in` decimal(7,4) NOT NULL,
	`gasket_thickness_in` decimal(7,4) NOT NULL,
	`deck_clearance_in` decimal(7,4) NOT NULL,
	`cam_intake_duration_deg` decimal(5,1) NOT NULL,
	`cam_exhaust_duration_deg` decimal(5,1) NOT NULL,
	`cam_intake_lift_in` decimal(7,4) NOT NULL,
	`cam_exhaust_lift_in` decimal(7,4) NOT NULL,
	`cam_lobe_separation_deg` decimal(5,1) NOT NULL,
	`cam_intake_centerline_deg` decimal(5,1) NOT NULL,
	`intake_manifold` varchar(160) NOT NULL,
	`throttle_body` varchar(80) NOT NULL,
	`injector_size_lb_hr` decimal(6,1),
	`injector_count` int,
	`fuel` enum('pump_gas','race_gas','e85','methanol') NOT NULL,
	`aspiration` enum('na','turbo','supercharged','nitrous') NOT NULL,
	`engine_management` varchar(120) NOT NULL,
	`intended_use` enum('drag','road_course','street_strip','off_road','marine','street') NOT NULL,
	`price_cents` bigint unsigned NOT NULL,
	`status` enum('draft','published','archived') NOT NULL DEFAULT 'draft',
	`published_at` datetime(3),
	`peak_hp` decimal(8,1),
	`peak_hp_rpm` int,
	`peak_tq` decimal(8,1),
	`peak_tq_rpm` int,
	`verified_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `builds_id` PRIMARY KEY(`id`),
	CONSTRAINT `builds_slug_unique` UNIQUE(`slug`)
);
--> statement-breakpoint
CREATE TABLE `dyno_pulls` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`build_id` bigint unsigned NOT NULL,
	`label` varchar(120) NOT NULL,
	`file_id` bigint unsigned NOT NULL,
	`sheet_file_id` bigint unsigned,
	`dyno_kind` enum('engine','chassis') NOT NULL,
	`declared_standard` varchar(20) NOT NULL,
	`declared_factor` decimal(6,4),
	`baro_in_hg` decimal(5,2),
	`air_temp_f` decimal(5,1),
	`humidity_pct` decimal(4,1),
	`declared_peak_hp` decimal(8,1),
	`declared_peak_hp_rpm` int,
	`declared_peak_tq` decimal(8,1),
	`declared_peak_tq_rpm` int,
	`summary` json NOT NULL,
	`fingerprint` varchar(255),
	`status` enum('submitted','verified','rejected') NOT NULL DEFAULT 'submitted',
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `dyno_pulls_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `files` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`owner_id` bigint unsigned NOT NULL,
	`kind` enum('pull','sheet','photo','attachment','proof') NOT NULL,
	`mime` varchar(120) NOT NULL,
	`size_bytes` int unsigned NOT NULL,
	`sha256` char(64) NOT NULL,
	`storage_key` varchar(255) NOT NULL,
	`original_name` varchar(255) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `files_id` PRIMARY KEY(`id`),
	CONSTRAINT `files_storage_key_unique` UNIQUE(`storage_key`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`password_hash` varchar(255),
	`role` enum('racer','builder','admin') NOT NULL,
	`unit_preference` enum('imperial','metric') NOT NULL DEFAULT 'imperial',
	`email_verified_at` datetime(3),
	`suspended_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_unique` UNIQUE(`email`)
);
--> statement-breakpoint
ALTER TABLE `build_parts` ADD CONSTRAINT `build_parts_build_id_builds_id_fk` FOREIGN KEY (`build_id`) REFERENCES `builds`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `builder_profiles` ADD CONSTRAINT `builder_profiles_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `builds` ADD CONSTRAINT `builds_builder_id_builder_profiles_id_fk` FOREIGN KEY (`builder_id`) REFERENCES `builder_profiles`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `dyno_pulls` ADD CONSTRAINT `dyno_pulls_build_id_builds_id_fk` FOREIGN KEY (`build_id`) REFERENCES `builds`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `dyno_pulls` ADD CONSTRAINT `dyno_pulls_file_id_files_id_fk` FOREIGN KEY (`file_id`) REFERENCES `files`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `dyno_pulls` ADD CONSTRAINT `dyno_pulls_sheet_file_id_files_id_fk` FOREIGN KEY (`sheet_file_id`) REFERENCES `files`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `files` ADD CONSTRAINT `files_owner_id_users_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `build_parts_build_idx` ON `build_parts` (`build_id`,`position`);--> statement-breakpoint
CREATE INDEX `builds_builder_idx` ON `builds` (`builder_id`);--> statement-breakpoint
CREATE INDEX `builds_status_idx` ON `builds` (`status`);--> statement-breakpoint
CREATE INDEX `dyno_pulls_build_idx` ON `dyno_pulls` (`build_id`);--> statement-breakpoint
CREATE INDEX `dyno_pulls_status_idx` ON `dyno_pulls` (`status`,`created_at`);--> statement-breakpoint
CREATE INDEX `files_sha256_idx` ON `files` (`sha256`);