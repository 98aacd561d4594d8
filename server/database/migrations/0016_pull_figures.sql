CREATE TABLE `pull_figures` (
	`pull_id` bigint unsigned NOT NULL,
	`version` int NOT NULL,
	`standards` json NOT NULL,
	`curve` json NOT NULL,
	`search_curve` json,
	`computed_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `pull_figures_pull_id` PRIMARY KEY(`pull_id`)
);
--> statement-breakpoint
ALTER TABLE `pull_figures` ADD CONSTRAINT `pull_figures_pull_id_dyno_pulls_id_fk` FOREIGN KEY (`pull_id`) REFERENCES `dyno_pulls`(`id`) ON DELETE cascade ON UPDATE no action;