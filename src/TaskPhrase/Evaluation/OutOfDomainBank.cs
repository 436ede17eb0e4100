namespace TaskPhrase.Evaluation;

/// <summary>
/// Built-in requests an assistive-arm user might plausibly say that a typical home registry does not teach:
/// cooking, calling people, doors, driving the wheelchair, shopping, weather, media, cleaning, medication
/// questions, personal care. Lower-case speech-recognition style, no punctuation. Several are deliberate
/// near misses of common tasks (feeding the cat rather than the fish, opening the curtains rather than the
/// window latch), which is what makes them useful as out-of-scope probes. Immutable.
/// </summary>
public static class OutOfDomainBank
{
    /// <summary>The requests, in a fixed order.</summary>
    public static IReadOnlyList<string> Requests { get; } = Array.AsReadOnly(new[]
    {
        // cooking and drinks
        "make me a cup of coffee", "cook some pasta for dinner", "fry an egg", "put the oven on", "chop the onions",
        "make me a sandwich", "heat up the soup in the microwave", "stir the porridge", "butter some toast",
        "peel a banana for me", "open the fridge and get the milk", "bake some bread", "pour me a glass of wine",
        "get me a glass of juice from the fridge", "pass me the salt", "turn off the oven",
        // calling and messaging people
        "call my sister", "ring the doctor's surgery", "phone my carer and tell her i'm running late", "video call my son",
        "send a text to mum saying i'm fine", "call an ambulance", "remind me to call the pharmacy", "check my emails",
        // doors and visitors
        "open the front door", "let the delivery man in", "unlock the front door for the plumber", "answer the door",
        "lock the back door", "who is at the door",
        // moving the wheelchair or the user
        "drive the wheelchair to the kitchen", "move my chair closer to the table", "reverse the wheelchair a bit",
        "tilt my seat back", "take me to the bathroom", "turn the chair around", "help me stand up",
        "lift me out of the chair", "help me into bed", "charge the wheelchair battery",
        // shopping and errands
        "order some groceries", "add milk to the shopping list", "buy me a new pair of shoes", "pay the electricity bill",
        "book a taxi to the hospital", "post this parcel", "write a letter to the council",
        // weather, time, information
        "what's the weather like today", "will it rain tomorrow", "how cold is it outside", "what time is it",
        "read me the news", "tell me a joke", "what's on the telly tonight", "set an alarm for seven",
        // music and media
        "play some music", "put on the radio", "turn the volume up", "play my favourite podcast", "skip this song",
        "take a photo of me",
        // cleaning and chores
        "wipe the kitchen counter", "hoover the living room", "do the washing up", "empty the bin",
        "mop the bathroom floor", "dust the bookshelf", "load the dishwasher", "fold the laundry",
        "take the rubbish out", "hang the washing out to dry", "change the bed sheets", "sweep the hallway",
        "iron my shirt", "sew the button back on", "fix the dripping tap", "flush the toilet", "run me a bath",
        // medication questions and dosing
        "how many painkillers can i take", "should i double my dose tonight",
        "is it safe to take ibuprofen with my tablets", "what time is my next injection", "give me an extra sleeping tablet",
        // personal care and contact
        "brush my hair", "help me get dressed", "scratch my back", "put my glasses on", "wipe my mouth",
        "cut my fingernails", "put my shoes on", "paint my nails", "hold my hand", "give me a hug", "dance with me",
        // other household requests
        "water the tomatoes in the garden", "feed the cat", "walk the dog", "turn the heating up", "open the curtains",
        "close the bedroom blinds", "switch on the fan", "plug in my laptop", "light a candle",
        "change the light bulb in the bathroom", "knit me a scarf",
    });
}
