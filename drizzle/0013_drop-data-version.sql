-- The response cache that read this counter is gone: every request now reads the data itself.
DROP TABLE IF EXISTS `data_version`;
