ALTER TABLE `assumption_versions` ADD `default_definitions` json;--> statement-breakpoint
ALTER TABLE `datasets` ADD `default_definition` text;