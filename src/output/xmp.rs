//! XMP metadata (ISO 16684-1) for panoramas: the published photo-sphere properties in the
//! GPano namespace (`http://ns.google.com/photos/1.0/panorama/`), so that panorama viewers
//! open an underlay as a 360-degree image facing the right way.

/// An equirectangular panorama's description: the whole sphere is `width` x `height`
/// pixels and all of it is in the image; the centre of the image looks along `heading`
/// (degrees clockwise from north), tilted by `pitch` and `roll` (degrees).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Panorama {
    /// Pixels across the whole panorama.
    pub width: u32,
    /// Pixels down the whole panorama.
    pub height: u32,
    /// The azimuth at the image's centre, degrees (the pose heading).
    pub heading_deg: f64,
    /// The view's pitch, degrees, positive up (the pose pitch).
    pub pitch_deg: f64,
    /// The view's roll, degrees (the pose roll).
    pub roll_deg: f64,
}

/// The XMP packet: a wrapper of `xpacket` processing instructions around one RDF
/// description with the GPano properties.
pub fn panorama_xmp(p: &Panorama) -> String {
    let heading = p.heading_deg.rem_euclid(360.0);
    let fields = [
        ("ProjectionType", "equirectangular".to_owned()),
        ("UsePanoramaViewer", "True".to_owned()),
        ("FullPanoWidthPixels", p.width.to_string()),
        ("FullPanoHeightPixels", p.height.to_string()),
        ("CroppedAreaImageWidthPixels", p.width.to_string()),
        ("CroppedAreaImageHeightPixels", p.height.to_string()),
        ("CroppedAreaLeftPixels", "0".to_owned()),
        ("CroppedAreaTopPixels", "0".to_owned()),
        ("PoseHeadingDegrees", format!("{heading:.3}")),
        ("PosePitchDegrees", format!("{:.3}", p.pitch_deg)),
        ("PoseRollDegrees", format!("{:.3}", p.roll_deg)),
    ];
    let mut xmp = String::from(
        "<?xpacket begin=\"\u{feff}\" id=\"W5M0MpCehiHzreSzNTczkc9d\"?>\n\
         <x:xmpmeta xmlns:x=\"adobe:ns:meta/\">\n\
         <rdf:RDF xmlns:rdf=\"http://www.w3.org/1999/02/22-rdf-syntax-ns#\">\n\
         <rdf:Description rdf:about=\"\" xmlns:GPano=\"http://ns.google.com/photos/1.0/panorama/\">\n",
    );
    for (name, value) in fields {
        xmp.push_str(&format!("<GPano:{name}>{value}</GPano:{name}>\n"));
    }
    xmp.push_str("</rdf:Description>\n</rdf:RDF>\n</x:xmpmeta>\n<?xpacket end=\"w\"?>");
    xmp
}
