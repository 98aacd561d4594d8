ALTER TABLE `dyno_pulls` ADD `comparison_role` enum('baseline','variant');--> statement-breakpoint
ALTER TABLE `dyno_pulls` ADD `change_kind` enum('heads','intake','camshaft','exhaust','tune','other');--> statement-breakpoint
ALTER TABLE `dyno_pulls` ADD `change_note` varchar(200);