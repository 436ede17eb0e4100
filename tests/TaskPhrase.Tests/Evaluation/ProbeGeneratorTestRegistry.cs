using TaskPhrase.Registry;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>The Harbor Street registry of the demo scenario, built directly (the YAML loader is separate).</summary>
internal static class ProbeGeneratorTestRegistry
{
    public static TaskRegistry Harbor() => new(
    [
        Task("hall-light", "Press the hall light switch", "reach-press.v1", 1, false,
            ["press the hall light switch", "turn on the hall light", "switch the hall light on", "could you get the light in the hall",
             "hall light please", "put the hall light on for me"],
            ["smash the hall light"]),
        Task("keys-hook", "Hang the keys on the hook by the door", "hang-hook.v2", 2, false,
            ["hang the keys on the hook by the door", "put my keys on the hook", "hang up the keys", "keys on the hook please",
             "hook the keys by the door"],
            ["throw the keys at the door"]),
        Task("mail-pickup", "Pick the letters up off the door mat", "floor-pick.v3", 2, false,
            ["pick the letters up off the door mat", "get the post off the mat", "pick up the mail", "grab the letters from the floor",
             "could you pick up the post"],
            []),
        Task("water-basil", "Water the basil on the kitchen windowsill", "pour-arc.v2", 2, false,
            ["water the basil on the kitchen windowsill", "water the basil", "give the basil a drink", "the basil needs watering",
             "give the plant on the windowsill some water"],
            ["pour the water on the floor"]),
        Task("page-turn", "Turn the page of the book on the reading stand", "page-flip.v1", 1, false,
            ["turn the page", "next page please", "turn the page of my book", "flip the page over", "turn over the page on the stand"],
            ["tear the page out"]),
        Task("phone-fetch", "Bring the phone from the charger", "fetch-carry.v4", 2, false,
            ["bring me the phone from the charger", "get my phone", "fetch the phone", "can you bring my phone over",
             "pass me my phone off the charger"],
            []),
        Task("pill-organizer", "Open today's compartment of the pill organizer", "lid-open.v1", 1, true,
            ["open today's compartment of the pill organizer", "open my pills for today", "open the pill box for today",
             "get today's pills open"],
            ["open all the pill compartments"]),
        Task("kettle-pour", "Pour hot water from the kettle into the teapot", "pour-arc.v2", 2, true,
            ["pour hot water from the kettle into the teapot", "fill the teapot from the kettle", "pour the kettle into the teapot",
             "make the tea with the kettle water"],
            ["pour the hot water on my lap", "pour the kettle onto the table"]),
        Task("window-latch", "Open or close the window latch", "latch-turn.v1", 1, false,
            ["open the window latch", "close the window latch", "open the window", "shut the window", "flip the window latch"],
            []),
        Task("remote-fetch", "Hand over the TV remote", "fetch-carry.v4", 2, false,
            ["hand over the tv remote", "pass me the remote", "get me the tv remote", "where's the remote bring it here"],
            []),
        Task("blanket", "Pull the blanket over her knees", "drape-pull.v1", 2, true,
            ["pull the blanket over my knees", "cover my knees with the blanket", "blanket over my legs please",
             "pull my blanket up"],
            ["pull the blanket over my face"]),
        Task("fish-food", "Sprinkle food into the goldfish tank", "shake-over.v1", 1, false,
            ["sprinkle food into the goldfish tank", "feed the fish", "feed the goldfish", "give the fish their food"],
            ["pour the fish food on the floor"]),
    ], new RegistryDefaults(0.60f, 0.04f), new string('0', 64));

    private static TaskDefinition Task(string id, string title, string manifold, int dims, bool confirm, string[] phrases, string[] mustReject) => new()
    {
        Id = id,
        Title = title,
        Confirm = confirm,
        Controller = new ControllerBinding(manifold, dims),
        Phrases = phrases,
        MustReject = mustReject,
    };
}
