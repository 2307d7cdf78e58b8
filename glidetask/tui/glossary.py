"""The words on screen, one meaning each: the same terms as ``glidetask plan`` and the
briefing (trade terms where the trade has one), listed on f1 beside the cautions."""

from __future__ import annotations

# (term, meaning); the order is the order a pilot meets them on the Task view
GLOSSARY: tuple[tuple[str, str], ...] = (
    ("Dist, Crs", "a leg's length and its true course, along the planned path"),
    ("Climb", "the average climb in the leg's first thermal (circling, not the vario's peak)"),
    ("MC", "MacCready setting: the climb expected in the next thermal; it sets the speed to fly"),
    ("TAS", "true airspeed to fly in the glides of the leg: the speed to fly"),
    ("IAS", "indicated airspeed: what the airspeed indicator shows at that height (TAS as IAS)"),
    ("Hdg", "heading to steer in the glides, set so the climbs' drift is made good"),
    ("Glide", "ground speed in the glides between thermals"),
    ("Cruise", "the speed between thermals (TAS in still air, Glide over the ground)"),
    ("Avg", "average leg speed over the ground: the leg's distance divided by its time, climbs included"),
    ("Time", "the leg's time, climbs included (h:mm)"),
    ("At", "clock time at the leg's start (local time)"),
    ("Need", "height above mean sea level (MSL) needed at the leg's start to final-glide home"),
    ("Arrive", "planned height (MSL) at the leg's end"),
    ("Task speed", "the task's distance divided by its time"),
    ("Final glide", "the last glide, to the finish without another climb"),
    ("ABOVE / BELOW final glide", "height to spare over, or short of, the height needed to reach the goal"),
    ("Core", "a thermal's strength on its axis, where no glider flies; the circle flown rises less"),
    ("Netto", "the air's own rise or sink: the variometer's reading less the glider's own sink"),
    ("Working band", "the heights between which the pilot climbs and glides (band bottom to band top)"),
    ("STF", "speed to fly in still air at a MacCready setting"),
    ("L/D", "glide ratio: distance covered per height lost"),
    ("Ballast", "water carried in the wings to raise the wing loading: faster glides, slower climbs"),
    ("Bugs", "insects on the wing: extra sink, in per cent"),
    ("MSL, AGL", "height above mean sea level; above the ground below"),
    ("Thermal radius", "the size of the thermal's core in the circling model (empty: from the day's layer, Allen 2006)"),
    ("Centring a climb", "time lost finding the core at each climb, added to the climb's time (common practice)"),
    ("Detour", "how much longer than the planned path the flight is flown, in per cent (common practice)"),
    ("Circling x stall", "circling speed as a multiple of the stall speed at that bank and mass (common practice)"),
    ("Netto", "the air's own rise or sink: on the circle, what the glider climbs plus its sink in the turn"),
)


def glossary_text() -> str:
    width = max(len(term) for term, _ in GLOSSARY)
    return "\n".join(f"{term.ljust(width)}  {meaning}" for term, meaning in GLOSSARY)
