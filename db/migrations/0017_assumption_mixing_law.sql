ALTER TABLE `assumption_versions` ADD `mixing_law` enum('gaussian','t') DEFAULT 'gaussian' NOT NULL;--> statement-breakpoint
ALTER TABLE `assumption_versions` ADD `nu` double;--> statement-breakpoint
ALTER TABLE `assumption_versions` ADD `nu_interval` json;