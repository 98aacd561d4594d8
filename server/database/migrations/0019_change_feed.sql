CREATE TABLE `build_changes` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`build_id` bigint unsigned NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `build_changes_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `stored_files` (
	`storage_key` varchar(255) NOT NULL,
	`body` longblob NOT NULL,
	`size_bytes` int unsigned NOT NULL,
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `stored_files_storage_key` PRIMARY KEY(`storage_key`)
);
--> statement-breakpoint
CREATE INDEX `build_changes_created_idx` ON `build_changes` (`created_at`);