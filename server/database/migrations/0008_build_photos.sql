CREATE TABLE `build_photos` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`build_id` bigint unsigned NOT NULL,
	`file_id` bigint unsigned NOT NULL,
	`position` int NOT NULL,
	`caption` varchar(160) NOT NULL DEFAULT '',
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `build_photos_id` PRIMARY KEY(`id`),
	CONSTRAINT `build_photos_file_unique` UNIQUE(`file_id`)
);
--> statement-breakpoint
ALTER TABLE `build_photos` ADD CONSTRAINT `build_photos_build_id_builds_id_fk` FOREIGN KEY (`build_id`) REFERENCES `builds`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `build_photos` ADD CONSTRAINT `build_photos_file_id_files_id_fk` FOREIGN KEY (`file_id`) REFERENCES `files`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `build_photos_build_idx` ON `build_photos` (`build_id`,`position`);