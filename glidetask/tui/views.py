"""The views of the app in the order of their keys (1, 2, ...): the app and the view bar
both read this, so neither imports the other."""

from __future__ import annotations

# view name -> (module in glidetask.tui.screens, class, title shown on the view bar)
VIEWS: dict[str, tuple[str, str, str]] = {
    "task": ("task_view", "TaskView", "Task"),
    "glider": ("glider_view", "GliderView", "Glider"),
    "day": ("day_view", "DayView", "Day"),
    "glide": ("glide_view", "GlideView", "Final glide"),
    "safety": ("safety_view", "SafetyView", "Safety"),
    "compare": ("compare_view", "CompareView", "Compare"),
    "odds": ("odds_view", "OddsView", "Odds"),
    "profile": ("profile_view", "ProfileView", "Profile"),
}
