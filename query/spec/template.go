package spec

// Template returns a commented example spec with every key and its
// meaning; `partsieve need --template` prints it. It parses as a valid
// spec (a 12 V vehicle accessory).
func Template() string { return template }

const template = `# partsieve application spec: describe the application once; partsieve
# derives the requirement set of every reverse-polarity protection topology
# from it (partsieve need) and ranks catalog parts against it (partsieve pick).
#
# Values are plain numbers in SI units (V, A, Ω, W, A²s, s; temperatures in
# °C) or strings with units: "20 mΩ", "-40 °C", "60 s", "3.5 A".
# A key written with the wrong unit is refused ("16 A" for a voltage).

[supply]
kind = "vehicle"        # battery | vehicle | adapter | bench | bus
                        # (batteries and vehicles deliver large fault currents)
v_min = "9 V"           # lowest steady input (cranking, undervoltage)
v_nom = "13.5 V"        # nominal input
v_max = "16 V"          # highest steady input
v_transient = "35 V"    # optional: highest short, clamped transient (e.g. a
                        # centrally clamped load dump); every rating that sees
                        # the input in normal operation must cover it
v_reverse = "14 V"      # magnitude of the reversed supply
reverse_time = "60 s"   # how long the reversal lasts, or "continuous";
                        # 10 s or more is judged on the thermal steady state
r_source = "20 mΩ"      # source plus wiring resistance: sets the fault current
shared = false          # true when other loads share this input: a single
                        # MOSFET would back-feed them, so MOSFET stages are
                        # ranked out

[load]
i_max = "3 A"           # highest steady load current
v_min = "8 V"           # lowest input the load works at, after the protection
v_reverse_max = "0.5 V" # reverse voltage the load survives
backfeed = false        # true when the load side can push current back
                        # (battery, supercapacitor, motor): MOSFET stages are
                        # ranked out, a series diode must also block v_holdup
# v_holdup = "16 V"     # voltage the load side keeps while the input is
                        # reversed; default 0, or supply.v_max when backfeed
inrush_i2t = "0.5 A2s"  # optional: I²t of one start-up (inrush) pulse ...
inrush_time = "2 ms"    # ... its length ...
inrush_pulses = 100000  # ... and the number of pulses in the product's life

[ambient]
t_min = "-40 °C"        # lowest ambient (cold corner: lowest input, full load)
t_max = "85 °C"         # highest ambient (hot corner: full load)

[budget]                # optional; budgets cover the whole protection stage
drop_max = "0.6 V"      # largest voltage drop (the headroom v_min − load.v_min
                        # applies anyway)
loss_max = "1.5 W"      # largest dissipation

[policy]
derating = "industrial" # commercial | industrial | high-reliability, or the
                        # name of a profile defined below
# Per-factor overrides use the names partsieve need prints, e.g.:
# k_vrrm = 0.7          # diode reverse voltage: V_R ≤ k·V_RRM
# tj_limit = 125        # junction temperature cap, °C
# Model overrides: rdson_alpha (%/K), vf_tc (V/K), ir_doubling (K).
# rdson_alpha = 0.45

# A custom profile: a built-in base plus overrides; select it with
# derating = "fleet".
[policy.profiles.fleet]
base = "industrial"
k_vds = 0.7

[build]
quantity = 2000         # build quantity: unit prices are taken at this quantity
currency = "EUR"        # currency of cost ranking and totals

[build.rates]           # converts offers in other currencies; an offer in a
USD = 0.92              # currency without a rate is listed but not costed
`
