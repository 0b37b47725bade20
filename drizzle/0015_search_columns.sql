ALTER TABLE `rate_record` ADD `donor_class` text;--> statement-breakpoint
ALTER TABLE `rate_record` ADD `acceptor_class` text;--> statement-breakpoint
ALTER TABLE `rate_record` ADD `donor_smiles` text;--> statement-breakpoint
ALTER TABLE `rate_record` ADD `acceptor_smiles` text;--> statement-breakpoint
ALTER TABLE `rate_record` ADD `notes` text;--> statement-breakpoint
ALTER TABLE `rate_record` ADD `solvent_polarity` real;--> statement-breakpoint
UPDATE `rate_record` SET
  `donor_class` = json_extract(`data`, '$.system.donor.class'),
  `acceptor_class` = json_extract(`data`, '$.system.acceptor.class'),
  `donor_smiles` = json_extract(`data`, '$.system.donor.smiles'),
  `acceptor_smiles` = json_extract(`data`, '$.system.acceptor.smiles'),
  `notes` = json_extract(`data`, '$.notes'),
  `solvent_polarity` = CASE
    WHEN json_extract(`data`, '$.medium.permittivity') <> 0 AND json_extract(`data`, '$.medium.refractiveIndex') <> 0
    THEN 1.0 / (json_extract(`data`, '$.medium.refractiveIndex') * json_extract(`data`, '$.medium.refractiveIndex'))
      - 1.0 / json_extract(`data`, '$.medium.permittivity')
  END;
