package catalog

// Invented parts from invented makers, enough to exercise every operator.
func sampleParts() []*Part {
	ps := []*Part{
		part(Diode, "Sable Semi", "SBX340-13", "type", "schottky", "desc", "Schottky rectifier 40V 3A", "package", "SMA",
			"vrrm", 40, "ifav", 3, "vf", 0.5, "ifsm", 80, "rohs", true, "lifecycle", "active"),
		part(Diode, "Sable Semi", "SBX1100", "type", "schottky", "desc", "Schottky barrier diode 100V 1A", "package", "SOD-123F",
			"vrrm", 100, "ifav", 1, "vf", 0.79, "rohs", true),
		part(Diode, "Quarry Devices", "QR1M", "type", "rectifier", "desc", "General purpose rectifier 1000V 1A", "package", "SMA",
			"vrrm", 1000, "ifav", 1, "vf", 1.1, "aecq", true),
		part(Diode, "Quarry Devices", "QZ5V1", "type", "zener", "desc", "Zener diode 5.1V 200mW", "package", "SOD-323",
			"vz", 5.1, "vz_tol", 0.05, "pd", 0.2),
		part(Diode, "Tern Micro", "TV15A", "type", "tvs", "desc", "TVS diode 15V unidirectional", "package", "SMB",
			"vrwm", 15, "vbr", 16.7, "vc", 24.4, "ipp", 24.6, "ppk", 600),
		part(MOSFET, "Tern Micro", "TPM4030", "type", "p", "desc", "P-channel MOSFET 40V 30 mOhm", "package", "SOT-23",
			"vds", 40, "rdson", 0.030, "id", 8, "vgs_max", 20),
		part(MOSFET, "Tern Micro", "TNM6008", "type", "n", "desc", "N-channel MOSFET 60V logic level", "package", "DFN5x6",
			"vds", 60, "rdson", 0.008, "id", 50, "vgs_th", 2.5),
		part(MOSFET, "Harrow Power", "HPN4012", "type", "n", "desc", "N-channel automotive MOSFET", "package", "DFN5x6",
			"vds", 40, "rdson", 0.012, "id", 35, "aecq", true),
		part(MOSFET, "Harrow Power", "HPN3020", "type", "n", "desc", "N-channel MOSFET 30V", "package", "SOT-23",
			"vds", 30, "id", 4),
		part(Fuse, "Lumen Fuse", "LF-2A-T", "type", "T", "desc", "Time-lag fuse 5x20 mm glass", "package", "5x20",
			"in", 2, "un_ac", 250, "un_dc", 63, "i2t", 3.5, "fuse_std", "iec"),
		part(Fuse, "Lumen Fuse", "LF-500M-F", "type", "F", "desc", "Quick-acting fuse 500 mA", "package", "5x20",
			"in", 0.5, "un_ac", 250),
	}
	ps[0].Offers = []Offer{offer("Northwind Parts", "NW-1001", 1200, 1, "eur", PriceBreak{1, 0.32}, PriceBreak{100, 0.21})}
	return ps
}
